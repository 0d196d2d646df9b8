import { number, object, string, type InferType } from 'yup'

export const SUPPORT_KINDS = ['real', 'positive', 'proportion', 'bounded'] as const
export type SupportKind = (typeof SUPPORT_KINDS)[number]

const finite = (label: string) => number().typeError(`${label} must be a number`).test('finite', `${label} must be a finite number`, (v) => v === undefined || v === null || Number.isFinite(v))

export const supportSchema = object({
  kind: string().required('Choose the support').oneOf([...SUPPORT_KINDS], 'Choose real, positive, proportion or bounded'),
  lower: finite('Lower bound').when('kind', { is: 'bounded', then: (s) => s.required('Enter the lower bound'), otherwise: (s) => s.strip() }),
  upper: finite('Upper bound').when('kind', {
    is: 'bounded',
    then: (s) => s.required('Enter the upper bound').test('above-lower', 'Upper bound must be above the lower bound', function (v) {
      const lower = this.parent.lower
      return typeof lower !== 'number' || typeof v !== 'number' || v > lower
    }),
    otherwise: (s) => s.strip(),
  }),
}).noUnknown('Unknown field: ${unknown}')

export const quantitySchema = object({
  name: string().trim().required('Enter a name').max(120, 'Use at most 120 characters'),
  symbol: string().trim().required('Enter a symbol').max(20, 'Use at most 20 characters')
    .matches(/^[A-Za-z][A-Za-z0-9_]*$/, 'Start with a letter; use letters, digits and _ only'),
  unit: string().trim().max(60, 'Use at most 60 characters').default(''),
  question: string().trim().required('Write the question exactly as experts will read it').min(20, 'Use at least 20 characters').max(3000, 'Use at most 3000 characters'),
  support: supportSchema.required('Choose the support'),
  assumptions: string().trim().max(5000, 'Use at most 5000 characters').default(''),
  evidenceNotes: string().trim().max(5000, 'Use at most 5000 characters').default(''),
}).noUnknown('Unknown field: ${unknown}')
export type QuantityBody = InferType<typeof quantitySchema>

export const versionRule = number().typeError('Version must be a number').required('Version is required').integer('Version must be a whole number').min(0)

export const quantityUpdateSchema = quantitySchema.shape({ version: versionRule })

export const calibrationQuestionSchema = object({
  question: string().trim().required('Enter the question').min(10, 'Use at least 10 characters').max(2000, 'Use at most 2000 characters'),
  unit: string().trim().max(60, 'Use at most 60 characters').default(''),
  trueValue: finite('True value').nullable().default(null),
}).noUnknown('Unknown field: ${unknown}')
export type CalibrationQuestionBody = InferType<typeof calibrationQuestionSchema>
export const calibrationQuestionUpdateSchema = calibrationQuestionSchema.shape({ version: versionRule })

/** Evidence uploads: what types and how large. */
export const EVIDENCE_TYPES: Record<string, string> = {
  'application/pdf': 'PDF',
  'text/csv': 'CSV',
  'image/png': 'PNG image',
  'image/jpeg': 'JPEG image',
}
export const EVIDENCE_MAX_BYTES = 5 * 1024 * 1024
/** The name endings each evidence type is stored and served under (the first is the one added when missing). */
export const EVIDENCE_EXTENSIONS: Record<string, readonly string[]> = {
  'application/pdf': ['.pdf'],
  'text/csv': ['.csv'],
  'image/png': ['.png'],
  'image/jpeg': ['.jpg', '.jpeg'],
}
/** Whether a file name ends as its content type's files do (case aside). */
export const nameFitsType = (filename: string, mime: string) => (EVIDENCE_EXTENSIONS[mime] ?? []).some((ext) => filename.toLowerCase().endsWith(ext))

