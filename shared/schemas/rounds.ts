import { array, boolean, date, number, object, string, type InferType } from 'yup'
import { displayNameRule } from './users'
import { emailRule, passwordRule } from './auth'
import { versionRule } from './quantities'
import { timeZoneRule } from './time-zone'

export const ELICITATION_METHODS = ['quantile', 'fixed-interval', 'chip-grid'] as const
export type ElicitationMethod = (typeof ELICITATION_METHODS)[number]
export const METHOD_LABELS: Record<ElicitationMethod, string> = {
  quantile: 'Quantile method',
  'fixed-interval': 'Fixed-interval method',
  'chip-grid': 'Chip grid',
}

/** Invented practice question with a known answer, used when the analyst sets none. */
export const DEFAULT_PRACTICE = {
  question: 'Practice: how many kilometres of water mains does the Kestrel Valley Water Board operate in total?',
  unit: 'km',
  answer: 1840,
}

const strictlyIncreasing = (v: unknown) => !Array.isArray(v) || v.every((x, i) => i === 0 || (typeof x === 'number' && x > v[i - 1]))

export const roundItemSchema = object({
  quantityId: number().typeError('Choose a quantity').required('Choose a quantity').integer().positive(),
  method: string().required('Choose a method').oneOf([...ELICITATION_METHODS], 'Choose the quantile method, fixed-interval method or chip grid'),
  edges: array(number().typeError('Interval edges must be numbers').required().test('finite', 'Interval edges must be finite numbers', Number.isFinite))
    .when('method', {
      is: (m: string) => m === 'fixed-interval' || m === 'chip-grid',
      then: (s) => s.required('Enter the interval edges').min(3, 'Give at least 3 edges (2 intervals)').max(31, 'Use at most 30 intervals')
        .test('increasing', 'Interval edges must be strictly increasing', strictlyIncreasing),
      otherwise: (s) => s.strip(),
    }),
  chips: number().typeError('Number of chips must be a number').when('method', {
    is: 'chip-grid',
    then: (s) => s.required('Enter the number of chips').integer('Use a whole number of chips').min(5, 'Use at least 5 chips').max(200, 'Use at most 200 chips'),
    otherwise: (s) => s.strip(),
  }),
  askTails: boolean().typeError('Must be true or false').default(false),
}).noUnknown('Unknown field: ${unknown}')

const roundFields = {
  title: string().trim().required('Enter a title').min(3, 'Use at least 3 characters').max(200, 'Use at most 200 characters'),
  briefing: string().trim().max(10000, 'Use at most 10000 characters').default(''),
  opensAt: date().typeError('Enter a valid date and time').required('Enter when the round opens'),
  closesAt: date().typeError('Enter a valid date and time').required('Enter when the round closes')
    .test('after-open', 'The round must close after it opens', function (v) {
      const opens = this.parent.opensAt
      return !(opens instanceof Date) || !(v instanceof Date) || v.getTime() > opens.getTime()
    }),
  items: array(roundItemSchema).required('Choose at least one quantity').min(1, 'Choose at least one quantity')
    .test('unique', 'Each quantity can appear once', (items) => !items || new Set(items.map((i) => i?.quantityId)).size === items.length),
  reminderHoursBefore: number().typeError('Reminder must be a number of hours').integer('Use whole hours').min(1, 'At least 1 hour').max(336, 'At most 336 hours (14 days)').nullable().default(24),
  /** The zone in which the round's e-mails state its times. */
  timeZone: timeZoneRule.default('UTC'),
  calibrationPosition: string().oneOf(['before', 'after'], 'Choose before or after').default('after'),
  feedbackEnabled: boolean().typeError('Must be true or false').default(false),
  askCalibration: boolean().typeError('Must be true or false').default(true),
  practiceQuestion: string().trim().min(10, 'Use at least 10 characters').max(2000, 'Use at most 2000 characters').default(DEFAULT_PRACTICE.question),
  practiceUnit: string().trim().max(60, 'Use at most 60 characters').default(DEFAULT_PRACTICE.unit),
  practiceAnswer: number().typeError('The practice answer must be a number').test('finite', 'The practice answer must be a finite number', Number.isFinite).default(DEFAULT_PRACTICE.answer),
}

export const roundSchema = object(roundFields).noUnknown('Unknown field: ${unknown}')
export type RoundBody = InferType<typeof roundSchema>

/** PATCH: any subset of the fields, plus the version seen (stale versions get 409). */
export const roundUpdateSchema = object({
  title: roundFields.title.optional().default(undefined),
  briefing: string().trim().max(10000, 'Use at most 10000 characters').optional(),
  opensAt: date().typeError('Enter a valid date and time').optional(),
  closesAt: date().typeError('Enter a valid date and time').optional(),
  items: array(roundItemSchema).min(1, 'Choose at least one quantity').optional().default(undefined)
    .test('unique', 'Each quantity can appear once', (items) => !items || new Set(items.map((i) => i?.quantityId)).size === items.length),
  reminderHoursBefore: number().typeError('Reminder must be a number of hours').integer('Use whole hours').min(1, 'At least 1 hour').max(336, 'At most 336 hours (14 days)').nullable().optional(),
  timeZone: timeZoneRule.optional(),
  calibrationPosition: string().oneOf(['before', 'after'], 'Choose before or after').optional(),
  feedbackEnabled: boolean().typeError('Must be true or false').optional(),
  askCalibration: boolean().typeError('Must be true or false').optional(),
  practiceQuestion: string().trim().min(10, 'Use at least 10 characters').max(2000, 'Use at most 2000 characters').optional(),
  practiceUnit: string().trim().max(60, 'Use at most 60 characters').optional(),
  practiceAnswer: number().typeError('The practice answer must be a number').optional(),
  version: versionRule,
}).noUnknown('Unknown field: ${unknown}')
export type RoundUpdateBody = InferType<typeof roundUpdateSchema>

export const invitationSchema = object({
  email: emailRule('Enter an e-mail address'),
  name: displayNameRule,
}).noUnknown('Unknown field: ${unknown}')

export const acceptInvitationSchema = object({
  name: displayNameRule,
  password: passwordRule,
}).noUnknown('Unknown field: ${unknown}')

export const declarationSchema = object({
  expertise: string().trim().required('Summarise your expertise').min(10, 'Use at least 10 characters').max(3000, 'Use at most 3000 characters'),
  interests: string().required('Say whether you have relevant interests').oneOf(['none', 'described'], 'Choose none or describe them'),
  interestsText: string().trim().max(3000, 'Use at most 3000 characters').when('interests', {
    is: 'described',
    then: (s) => s.required('Describe your interests').min(5, 'Use at least 5 characters'),
    otherwise: (s) => s.default(''),
  }),
  seenPilotData: boolean().typeError('Answer yes or no').required('Say whether you have seen the pilot data'),
}).noUnknown('Unknown field: ${unknown}')
export type DeclarationBody = InferType<typeof declarationSchema>

/** A request that carries no fields (e.g. confirming an earlier declaration). */
export const emptySchema = object({}).noUnknown('Unknown field: ${unknown}')


const increasing = (key: 'value' | 'prob') => (v: unknown) =>
  !Array.isArray(v) || v.every((p, i) => i === 0 || (p && v[i - 1] && p[key] > v[i - 1][key]))

/** Points of an elicited CDF: P(X ≤ value) = prob; values and probabilities strictly increasing. */
export const pointsSchema = array(object({
  value: number().typeError('Each value must be a number').required('Enter a value').test('finite', 'Values must be finite numbers', Number.isFinite),
  prob: number().typeError('Each probability must be a number').required('Enter a probability').moreThan(0, 'Probabilities must be above 0').lessThan(1, 'Probabilities must be below 1'),
}).noUnknown('Unknown field: ${unknown}'))
  .required('Enter your values').min(2, 'Give at least two values')
  .test('values-increasing', 'Each value must be larger than the one before', increasing('value'))
  .test('probs-increasing', 'Probabilities must increase with the values', increasing('prob'))

export const practiceSchema = object({ points: pointsSchema }).noUnknown('Unknown field: ${unknown}')
