import { array, boolean, mixed, number, object, string, type InferType } from 'yup'
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

export const COMPOSITION_DATA_LAYOUTS = ['columns', 'rows'] as const
const csvColumn = string().trim().required('Choose a column').max(200, 'Use at most 200 characters')

/** Multinomial pilot data of a composition, sent as the CSV's text with where each share's counts are. */
export const compositionDatasetSchema = object({
  name: string().trim().required('Name the dataset').max(200, 'Use at most 200 characters'),
  filename: string().trim().required('Choose a CSV file').max(200, 'Use at most 200 characters'),
  csv: string().required('Choose a CSV file').max(2 * 1024 * 1024, 'Pilot data files may be at most 2 MB.'),
  delimiter: mixed<',' | ';' | '\t'>().oneOf([',', ';', '\t'], 'Choose comma, semicolon or tab').default(','),
  layout: string().required('Choose how the file records the shares').oneOf([...COMPOSITION_DATA_LAYOUTS], 'Choose a count column per share, or one row per observation'),
  categoryColumns: array(csvColumn).when('layout', { is: 'columns', then: (s) => s.required('Choose the column of each share'), otherwise: (s) => s.strip() }),
  categoryColumn: string().when('layout', { is: 'rows', then: () => csvColumn, otherwise: (s) => s.strip() }),
  categories: array(string().trim().required('Enter the value that stands for this share').max(200, 'Use at most 200 characters'))
    .when('layout', { is: 'rows', then: (s) => s.required('Enter the value that stands for each share'), otherwise: (s) => s.strip() }),
}).noUnknown('Unknown field: ${unknown}')
export type CompositionDatasetBody = InferType<typeof compositionDatasetSchema>

export const compositionImpactSchema = object({
  datasetId: number().typeError('Choose a dataset').required('Choose a dataset').integer('Choose a dataset').positive('Choose a dataset'),
}).noUnknown('Unknown field: ${unknown}')
