import { object, string, type InferType } from 'yup'

/** Spaces and invisible separators that pasted or autofilled addresses carry at either end. */
const EDGE_SPACES = /^[\s\u180e\u200b-\u200d\u2060\ufeff]+|[\s\u180e\u200b-\u200d\u2060\ufeff]+$/gu

/**
 * One spelling per address: NFKC (full-width and compatibility letters become plain ones), every Unicode space and
 * invisible separator trimmed from both ends, lower case. Sign-in limits and account look-ups key on this form.
 */
export function normaliseEmail(raw: string): string {
  return raw.normalize('NFKC').replace(EDGE_SPACES, '').toLowerCase()
}

/** An e-mail address field: normalised, then checked. */
export const emailRule = (required: string) =>
  string().transform((v) => (typeof v === 'string' ? normaliseEmail(v) : v)).required(required).email('Enter a valid e-mail address').max(254)

export const signInSchema = object({
  email: emailRule('Enter your e-mail address'),
  password: string().required('Enter your password').max(200, 'Password is too long'),
})
export type SignInBody = InferType<typeof signInSchema>

/** Password rule shared by account creation and invitation acceptance. */
export const passwordRule = string()
  .required('Choose a password')
  .min(10, 'Use at least 10 characters')
  .max(200, 'Use at most 200 characters')
  .matches(/[A-Za-z]/, 'Include at least one letter')
  .matches(/[^A-Za-z]/, 'Include at least one digit or symbol')
