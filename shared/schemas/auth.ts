import { object, string, type InferType } from 'yup'

export const signInSchema = object({
  email: string().trim().required('Enter your e-mail address').email('Enter a valid e-mail address').max(254),
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
