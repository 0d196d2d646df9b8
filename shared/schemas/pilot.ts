import { boolean, mixed, number, object, string } from 'yup'
import { PILOT_MODELS } from '../elicitation/pilot'

const column = (label: string) => string().trim().required(`Choose the ${label} column`).max(200)

/** The form fields sent with a pilot-data upload (multipart), checked before the file is read. */
export const pilotUploadSchema = object({
  quantityId: number().typeError('Choose a quantity').required('Choose a quantity').integer().positive(),
  name: string().trim().required('Name the dataset').max(200, 'Use at most 200 characters'),
  model: string().required('Choose the likelihood model').oneOf([...PILOT_MODELS], 'Choose a likelihood model'),
  valueColumn: column('values').when('model', { is: (m: string) => m === 'normal' || m === 'normal-known-sigma', then: (s) => s, otherwise: (s) => s.strip().optional() }),
  sigma: number().typeError('σ must be a number').when('model', {
    is: 'normal-known-sigma', then: (s) => s.required('Enter the known σ').moreThan(0, 'σ must be above 0'), otherwise: (s) => s.strip(),
  }),
  sigmaPriorScale: number().typeError('The scale must be a number').when('model', {
    is: 'normal', then: (s) => s.required('Enter the scale of the half-normal prior for σ').moreThan(0, 'The scale must be above 0'), otherwise: (s) => s.strip(),
  }),
  binomialLayout: string().when('model', { is: 'binomial', then: (s) => s.required('Choose how the file records successes').oneOf(['counts', 'binary'], 'Choose counts or a 0/1 column'), otherwise: (s) => s.strip() }),
  successesColumn: string().when(['model', 'binomialLayout'], { is: (m: string, l: string) => m === 'binomial' && l === 'counts', then: () => column('successes'), otherwise: (s) => s.strip() }),
  trialsColumn: string().when(['model', 'binomialLayout'], { is: (m: string, l: string) => m === 'binomial' && l === 'counts', then: () => column('trials'), otherwise: (s) => s.strip() }),
  binaryColumn: string().when(['model', 'binomialLayout'], { is: (m: string, l: string) => m === 'binomial' && l === 'binary', then: () => column('0/1'), otherwise: (s) => s.strip() }),
  countColumn: string().when('model', { is: 'poisson', then: () => column('counts'), otherwise: (s) => s.strip() }),
  exposureColumn: string().when('model', { is: 'poisson', then: () => column('exposure'), otherwise: (s) => s.strip() }),
  delimiter: mixed<',' | ';' | '\t'>().oneOf([',', ';', '\t'], 'Choose comma, semicolon or tab').default(','),
  /** Store the file even when the same file (same SHA-256) is already a version of this quantity's pilot data. */
  allowDuplicate: boolean().typeError('Must be true or false').default(false),
}).noUnknown('Unknown field: ${unknown}')
