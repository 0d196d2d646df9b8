import { boolean, object, string, type InferType } from 'yup'
import { ROLES } from '../types/index'
import { emailRule, passwordRule } from './auth'

export const displayNameRule = string().trim().required('Enter a display name').min(2, 'Use at least 2 characters').max(100, 'Use at most 100 characters')

export const userCreateSchema = object({
  email: emailRule('Enter an e-mail address'),
  displayName: displayNameRule,
  role: string().required('Choose a role').oneOf([...ROLES], 'Choose one of: admin, analyst, expert, reviewer'),
  password: passwordRule,
}).noUnknown('Unknown field: ${unknown}')
export type UserCreateBody = InferType<typeof userCreateSchema>

export const userUpdateSchema = object({
  displayName: displayNameRule.optional().default(undefined),
  role: string().oneOf([...ROLES], 'Choose one of: admin, analyst, expert, reviewer').optional(),
  disabled: boolean().strict().typeError('Must be true or false').optional(),
}).noUnknown('Unknown field: ${unknown}')
export type UserUpdateBody = InferType<typeof userUpdateSchema>
