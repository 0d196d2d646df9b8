import { array, boolean, number, object, string, type InferType } from 'yup'
import { versionRule } from './quantities'

/** How many elicited shares a composition holds (the "other" share, when wanted, comes on top). */
export const COMPOSITION_MIN_SHARES = 2
export const COMPOSITION_MAX_SHARES = 10
export const COMPOSITION_SHARE_COUNT_MESSAGE = `Choose ${COMPOSITION_MIN_SHARES} to ${COMPOSITION_MAX_SHARES} quantities as shares`
export const COMPOSITION_DUPLICATE_MESSAGE = 'Each quantity can be a share only once'
export const COMPOSITION_NOT_PROPORTION_MESSAGE = 'Only quantities on the proportion scale (between 0 and 1) can be shares'
export const COMPOSITION_OTHER_STUDY_MESSAGE = 'This quantity does not belong to this study'
export const DEFAULT_RESIDUAL_LABEL = 'Other'

export const compositionSchema = object({
  name: string().trim().required('Enter a name').max(120, 'Use at most 120 characters'),
  wording: string().trim().required('Say what the shares are shares of, as experts will read it')
    .min(10, 'Use at least 10 characters').max(3000, 'Use at most 3000 characters'),
  quantityIds: array(number().typeError('Choose a quantity').integer('Choose a quantity').positive('Choose a quantity').required('Choose a quantity'))
    .required(COMPOSITION_SHARE_COUNT_MESSAGE)
    .min(COMPOSITION_MIN_SHARES, COMPOSITION_SHARE_COUNT_MESSAGE)
    .max(COMPOSITION_MAX_SHARES, COMPOSITION_SHARE_COUNT_MESSAGE)
    .test('unique', COMPOSITION_DUPLICATE_MESSAGE, (ids) => !ids || new Set(ids).size === ids.length),
  residual: boolean().typeError('Must be true or false').default(false),
  residualLabel: string().trim().max(120, 'Use at most 120 characters').default(''),
}).noUnknown('Unknown field: ${unknown}')
export type CompositionBody = InferType<typeof compositionSchema>

export const compositionUpdateSchema = compositionSchema.shape({ version: versionRule })
