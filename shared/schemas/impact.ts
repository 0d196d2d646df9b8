import { array, mixed, number, object, string } from 'yup'

/** A candidate prior the analyst adds by hand: a distribution object the engine validates. */
const distribution = mixed<Record<string, unknown>>().test('object', 'Give a distribution', (v) => v === undefined || v === null || (typeof v === 'object' && !Array.isArray(v)))

/** The training fraction b of the fractional Bayes factor: strictly between 0 and 1 (O'Hagan 1995, §3). */
export const TRAINING_FRACTION_MESSAGE = 'The training fraction b must be greater than 0 and less than 1'

export const impactSchema = object({
  datasetId: number().typeError('Choose a pilot dataset').required('Choose a pilot dataset').integer().positive(),
  comparison: distribution.required('Set a comparison prior (for example a wide one) that every Bayes factor is taken against'),
  mixtureWeight: number().typeError('The weight must be a number').min(0.01, 'Between 0.01 and 0.99').max(0.99, 'Between 0.01 and 0.99').nullable().default(null),
  mixtureWide: distribution.nullable().default(null)
    .when('mixtureWeight', { is: (w: unknown) => typeof w === 'number', then: (s) => s.required('Give the wide component of the robust mixture') }),
  decision: object({
    direction: string().required().oneOf(['above', 'below'], 'Choose above or below'),
    threshold: number().typeError('The threshold must be a number').required('Enter the threshold'),
    probability: number().typeError('The probability must be a number').required('Enter the probability').moreThan(0, 'Between 0 and 1').lessThan(1, 'Between 0 and 1'),
  }).nullable().default(null),
  factors: array(number().required().moreThan(0, 'Width factors must be positive').max(100)).min(3).max(60).optional(),
  /** Training fraction b of the fractional Bayes factors; null: m₀/n, the minimal training sample over the pilot n. */
  trainingFraction: number().typeError('The training fraction b must be a number').moreThan(0, TRAINING_FRACTION_MESSAGE).lessThan(1, TRAINING_FRACTION_MESSAGE).nullable().default(null),
  /** Experts (user ids) whose priors the analysis leaves out, e.g. one whose answer cannot be computed with. */
  excludedExperts: array(number().typeError('Choose experts by their id').required().integer().positive()).max(100).default([]),
}).noUnknown('Unknown field: ${unknown}')

/** Why the final prior goes into the record without an impact analysis (for example: no pilot data exist). */
export const impactNotRunSchema = object({
  reason: string().typeError('Must be text').trim().required('Say why no impact analysis was run').min(20, 'Explain in at least 20 characters; it goes into the prior record').max(2000, 'Use at most 2000 characters'),
}).noUnknown('Unknown field: ${unknown}')
