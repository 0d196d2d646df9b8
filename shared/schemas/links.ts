import { array, number, object, string, type InferType } from 'yup'
import { versionRule } from './quantities'

export const LINK_WORDING_MAX = 1000
export const LINK_SAME_QUANTITY_MESSAGE = 'Choose two different quantities'
export const LINK_NOT_IN_ROUND_MESSAGE = 'Choose a quantity asked in this round'
export const LINK_ALREADY_LINKED_MESSAGE = 'These two quantities are already linked in this round'
export const LINK_DRAFT_ONLY_MESSAGE = 'Links can be changed only while the round is a draft: once it is open, every expert must read the same questions'
export const LINK_PROBABILITY_MESSAGE = 'Give a chance above 0 % and below 100 %'
export const LINK_ORDER_MESSAGE = 'List every link of this round once'

const quantityId = (which: string) =>
  number().typeError(`Choose the ${which} quantity`).required(`Choose the ${which} quantity`).integer(`Choose the ${which} quantity`).positive(`Choose the ${which} quantity`)

/** A link between two quantities of a round; the question is about the second given the first. */
export const linkSchema = object({
  firstQuantityId: quantityId('first'),
  secondQuantityId: quantityId('second').test('distinct', LINK_SAME_QUANTITY_MESSAGE, function (v) {
    return v === undefined || v !== this.parent.firstQuantityId
  }),
  wording: string().trim().max(LINK_WORDING_MAX, `Use at most ${LINK_WORDING_MAX} characters`).default(''),
}).noUnknown('Unknown field: ${unknown}')
export type LinkBody = InferType<typeof linkSchema>

export const linkUpdateSchema = linkSchema.shape({ version: versionRule })

export const linkOrderSchema = object({
  linkIds: array(number().typeError('Each link is a number').required().integer().positive()).required(LINK_ORDER_MESSAGE).min(1, LINK_ORDER_MESSAGE)
    .test('unique', LINK_ORDER_MESSAGE, (ids) => !ids || new Set(ids).size === ids.length),
}).noUnknown('Unknown field: ${unknown}')

/** One save of an expert's answer to a link's question: a draft may leave the chance empty, never at 0 or 100 %. */
export const linkAnswerSchema = object({
  probability: number().typeError(LINK_PROBABILITY_MESSAGE).nullable().default(null)
    .test('inside', LINK_PROBABILITY_MESSAGE, (p) => p === null || p === undefined || (Number.isFinite(p) && p > 0 && p < 1)),
  rationale: string().max(5000, 'Use at most 5000 characters').default(''),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')
export type LinkAnswerBody = InferType<typeof linkAnswerSchema>
