import { array, number, object, string, type InferType } from 'yup'
import { ELICITATION_METHODS } from './rounds'
import { versionRule } from './quantities'

export const FAMILIES = ['normal', 'student-t', 'lognormal', 'gamma', 'beta', 'scaled-beta', 'uniform'] as const

const finiteNumber = (label: string) =>
  number().typeError(`${label} must be a number`).test('finite', `${label} must be a finite number`, (v) => v === undefined || v === null || Number.isFinite(v))

/**
 * One save of a judgement. Drafts may be incomplete (values still missing) but never incoherent:
 * values that are entered must increase, probabilities must not exceed 100 %, chips must not exceed the round's number.
 */
export const judgementSchema = object({
  method: string().required('The method is required').oneOf([...ELICITATION_METHODS], 'Unknown method'),
  lower: finiteNumber('The lower bound').nullable().default(null),
  upper: finiteNumber('The upper bound').nullable().default(null),
  points: array(object({
    value: finiteNumber('Each value').required('Enter a value'),
    prob: number().typeError('Each probability must be a number').required().moreThan(0, 'Probabilities must be above 0').lessThan(1, 'Probabilities must be below 1'),
  }).noUnknown('Unknown field: ${unknown}')).max(9, 'At most 9 values').default([]),
  edges: array(finiteNumber('Each edge').required()).max(31).optional(),
  probs: array(number().typeError('Each probability must be a number').defined().nullable().min(0, 'Probabilities cannot be negative').max(1, 'A probability cannot exceed 100 %')).max(30).optional(),
  chips: array(number().typeError('Chip counts must be numbers').required().integer('Chip counts are whole numbers').min(0, 'Chip counts cannot be negative')).max(30).optional(),
  rationale: string().max(5000, 'Use at most 5000 characters').default(''),
  chosenFamily: string().oneOf([...FAMILIES], 'Unknown distribution family').nullable().default(null),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')
export type JudgementBody = InferType<typeof judgementSchema>

export const RATIONALE_MIN = 20

export const calibrationAnswerSchema = object({
  q05: finiteNumber('The 5 % value').required('Enter your 5 % value'),
  q50: finiteNumber('The median').required('Enter your median').test('above', 'The median must be above the 5 % value', function (v) {
    return typeof v !== 'number' || typeof this.parent.q05 !== 'number' || v > this.parent.q05
  }),
  q95: finiteNumber('The 95 % value').required('Enter your 95 % value').test('above', 'The 95 % value must be above the median', function (v) {
    return typeof v !== 'number' || typeof this.parent.q50 !== 'number' || v > this.parent.q50
  }),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')

export const reopenSchema = object({
  expertId: number().typeError('Choose an expert').required('Choose an expert').integer().positive(),
  reason: string().trim().required('Say why the answers are reopened').min(5, 'Use at least 5 characters').max(1000),
}).noUnknown('Unknown field: ${unknown}')
