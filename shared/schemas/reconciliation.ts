import { array, boolean, mixed, number, object, string, type InferType } from 'yup'
import { FAMILIES } from './judgements'
import { versionRule } from './quantities'
import { pointsSchema } from './rounds'

export const POOL_METHODS = ['linear', 'logarithmic', 'consensus'] as const
export const POOL_METHOD_LABELS: Record<(typeof POOL_METHODS)[number], string> = {
  linear: 'Linear opinion pool',
  logarithmic: 'Logarithmic opinion pool',
  consensus: 'Agreed consensus',
}

/** Shortest reason, after trimming, for marking a prior reconciled: it goes into the prior record. */
export const RECONCILED_RATIONALE_MIN = 20

/** What marking a prior reconciled asks for, by field. */
export const RECONCILED_NEEDS = {
  family: 'Choose the family of the final prior',
  rationale: `Explain the choice in at least ${RECONCILED_RATIONALE_MIN} characters; it goes into the prior record`,
} as const

const chosen = (d: unknown) => d !== null && d !== undefined

export const reconciliationSchema = object({
  roundId: number().typeError('Choose a round').required('Choose a round').integer().positive(),
  method: string().required('Choose how to combine').oneOf([...POOL_METHODS], 'Choose linear, logarithmic or consensus'),
  weights: mixed<'equal' | 'performance' | number[]>()
    .test('weights', 'Weights are equal, performance or one number per expert', (v) =>
      v === undefined || v === 'equal' || v === 'performance' || (Array.isArray(v) && v.every((x) => typeof x === 'number' && Number.isFinite(x) && x >= 0)))
    .default('equal'),
  weightsReason: string().trim().max(2000, 'Use at most 2000 characters').default('')
    .when('weights', { is: (w: unknown) => Array.isArray(w), then: (s) => s.required('Say why you set the weights by hand').min(10, 'Use at least 10 characters') }),
  cutoff: number().typeError('The cutoff must be a number').min(0, 'The cutoff is between 0 and 1').lessThan(1, 'The cutoff must be below 1').default(0),
  excludedExperts: array(number().required().integer()).max(100).default([]),
  consensus: object({
    points: pointsSchema,
    participants: string().trim().required('Say who took part in the discussion').max(2000),
    notes: string().trim().max(10000, 'Use at most 10000 characters').default(''),
  }).default(undefined).when('method', { is: 'consensus', then: (s) => s.required('Enter the agreed values'), otherwise: (s) => s.strip() }),
  family: string().oneOf([...FAMILIES], 'Unknown distribution family').nullable().default(null)
    .when(['reconciled', 'distribution'], ([reconciled, distribution], s) => (reconciled === true && !chosen(distribution) ? s.required(RECONCILED_NEEDS.family) : s)),
  distribution: mixed<Record<string, unknown>>().nullable().default(null)
    .test('object', 'The distribution must be an object', (v) => v === null || v === undefined || (typeof v === 'object' && !Array.isArray(v))),
  adjustReason: string().trim().max(2000).default('')
    .when('distribution', { is: chosen, then: (s) => s.required('Say why you adjusted the parameters by hand').min(10, 'Use at least 10 characters') }),
  rationale: string().trim().max(10000, 'Use at most 10000 characters').default('')
    .when('reconciled', { is: true, then: (s) => s.min(RECONCILED_RATIONALE_MIN, RECONCILED_NEEDS.rationale) }),
  reconciled: boolean().typeError('Must be true or false').default(false),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')
export type ReconciliationBody = InferType<typeof reconciliationSchema>
