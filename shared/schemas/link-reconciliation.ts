import { number, object, string, type InferType } from 'yup'
import { versionRule } from './quantities'

export const LINK_DECISIONS = ['confirm', 'override'] as const
export const LINK_OVERRIDE_REASON_MIN = 10
export const LINK_CORRELATION_MESSAGE = 'Give a correlation above −1 and below 1'
export const LINK_REASON_MESSAGE = `Say why in at least ${LINK_OVERRIDE_REASON_MIN} characters; it goes into the prior record`

/** Confirm the experts' pooled correlation of a link, or override it with a value and a reason (`version` 0 for a first decision). */
export const linkReconciliationSchema = object({
  decision: string().required('Choose to confirm or override').oneOf([...LINK_DECISIONS], 'Choose to confirm or override'),
  correlation: number().typeError(LINK_CORRELATION_MESSAGE).nullable().default(null)
    .test('inside', LINK_CORRELATION_MESSAGE, (r) => r === null || r === undefined || (r > -1 && r < 1))
    .when('decision', { is: 'override', then: (s) => s.required(LINK_CORRELATION_MESSAGE), otherwise: (s) => s.strip() }),
  reason: string().trim().max(5000, 'Use at most 5000 characters').default('')
    .when('decision', { is: 'override', then: (s) => s.required(LINK_REASON_MESSAGE).min(LINK_OVERRIDE_REASON_MIN, LINK_REASON_MESSAGE) }),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')
export type LinkReconciliationBody = InferType<typeof linkReconciliationSchema>

export const JOINT_DRAWS_MAX = 100_000
export const JOINT_DRAWS_DEFAULT = 10_000
/** The seed when none is given: the same file on every download. */
export const JOINT_DRAWS_DEFAULT_SEED = 20261203
export const JOINT_DRAWS_SEED_MAX = 2 ** 31 - 1
const DRAWS_MESSAGE = `Ask for a whole number of draws from 1 to ${JOINT_DRAWS_MAX}`
const SEED_MESSAGE = `The seed is a whole number from 0 to ${JOINT_DRAWS_SEED_MAX}`

/** The query of a joint-draws download: how many draws and the seed of the generator. */
export const jointDrawsSchema = object({
  n: number().typeError(DRAWS_MESSAGE).integer(DRAWS_MESSAGE).min(1, DRAWS_MESSAGE).max(JOINT_DRAWS_MAX, DRAWS_MESSAGE).default(JOINT_DRAWS_DEFAULT),
  seed: number().typeError(SEED_MESSAGE).integer(SEED_MESSAGE).min(0, SEED_MESSAGE).max(JOINT_DRAWS_SEED_MAX, SEED_MESSAGE).default(JOINT_DRAWS_DEFAULT_SEED),
}).noUnknown('Unknown field: ${unknown}')
export type JointDrawsQuery = InferType<typeof jointDrawsSchema>
