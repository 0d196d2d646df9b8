import { boolean, object, string, type InferType } from 'yup'
import { ROLES } from '../types/index'
import { passwordRule } from './auth'

/** Invisible marks that reorder the text around them (bidirectional embeddings, overrides, isolates and marks). */
export const BIDI_CONTROLS = /[\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g

/** Names reach e-mail headers and other people's screens: no invisible characters that make them read differently. */
export const displayNameRule = string().trim().required('Enter a display name').min(2, 'Use at least 2 characters').max(100, 'Use at most 100 characters')
  .test('no-bidi', 'Remove the invisible text-direction characters from the name', (v) => v === undefined || !new RegExp(BIDI_CONTROLS.source).test(v))

export const userCreateSchema = object({
  email: string().trim().lowercase().required('Enter an e-mail address').email('Enter a valid e-mail address').max(254),
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
