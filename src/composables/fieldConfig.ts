/**
 * vee-validate field behaviour for forms (pass to `defineField`): check a field when it loses
 * focus and on submit, and while it shows an error re-check it on every change so the message
 * clears as soon as it is fixed.
 */
export function revalidateOnceInvalid(state: { errors: string[] }) {
  return {
    validateOnBlur: true,
    validateOnChange: false,
    validateOnInput: false,
    validateOnModelUpdate: state.errors.length > 0,
  }
}
