import { array, boolean, number, object, string, type InferType } from 'yup'

export const recordCommentSchema = object({
  section: string().trim().max(80, 'Use at most 80 characters').default('General'),
  body: string().trim().required('Write the comment').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')

export const recordReturnSchema = object({
  section: string().trim().max(80, 'Use at most 80 characters').default('General'),
  comment: string().trim().required('Say what needs to change before you can sign off').min(10, 'Use at least 10 characters').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')

export const recordSettingsSchema = object({
  showNames: boolean().typeError('Must be true or false').required('Say whether expert names appear'),
}).noUnknown('Unknown field: ${unknown}')

export const recordChartSchema = object({
  symbol: string().required().max(20),
  png: string().required('Send the chart as a PNG data URL').matches(/^data:image\/png;base64,[A-Za-z0-9+/=]+$/, 'Send the chart as a PNG data URL').max(3_000_000, 'The chart image is too large'),
}).noUnknown('Unknown field: ${unknown}')

/** How the analyst answers a comment a reviewer returned the record with. */
export const COMMENT_OUTCOMES = ['answered', 'not-changed'] as const
export type CommentOutcome = (typeof COMMENT_OUTCOMES)[number]
export const COMMENT_OUTCOME_LABELS: Record<CommentOutcome, string> = { answered: 'Answered: the record was changed', 'not-changed': 'Not changed' }

export const commentResponseSchema = object({
  commentId: number().typeError('Must be a number').integer('Must be a whole number').positive('Must be a comment id').required('Say which comment this answers'),
  outcome: string().required('Say whether you changed the record').oneOf(COMMENT_OUTCOMES, 'Choose “answered” or “not changed”'),
  reply: string().trim().max(5000, 'Use at most 5000 characters').when('outcome', {
    is: 'not-changed',
    then: (s) => s.required('Say why nothing changed').min(10, 'Use at least 10 characters'),
    otherwise: (s) => s.required('Say what you changed').min(10, 'Use at least 10 characters'),
  }),
}).noUnknown('Unknown field: ${unknown}')

/** Submitting for review; after a return, one answer per comment the record was returned with. */
export const recordSubmitSchema = object({
  responses: array(commentResponseSchema).max(200, 'Too many answers').default([]),
}).noUnknown('Unknown field: ${unknown}')
export type RecordSubmitBody = InferType<typeof recordSubmitSchema>

/** Leaving a quantity out of the record: the reason is stated in the record. */
export const recordExclusionSchema = object({
  quantityId: number().typeError('Must be a number').integer('Must be a whole number').positive('Must be a quantity id').required('Say which quantity'),
  reason: string().trim().required('Say why this quantity is left out of the record').min(10, 'Use at least 10 characters').max(2000, 'Use at most 2000 characters'),
}).noUnknown('Unknown field: ${unknown}')
