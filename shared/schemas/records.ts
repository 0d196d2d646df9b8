import { boolean, object, string } from 'yup'

export const recordCommentSchema = object({
  section: string().trim().max(80, 'Use at most 80 characters').default('General'),
  body: string().trim().required('Write the comment').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')

export const recordReturnSchema = object({
  section: string().trim().max(80, 'Use at most 80 characters').default('General'),
  comment: string().trim().required('Say what needs to change before you can sign off').min(10, 'Use at least 10 characters').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')

export const recordSettingsSchema = object({
  showNames: boolean().typeError('Must be true or false').required('Say whether expert names appear'),
}).noUnknown('Unknown field: ${unknown}')

export const recordChartSchema = object({
  symbol: string().required().max(20),
  png: string().required('Send the chart as a PNG data URL').matches(/^data:image\/png;base64,[A-Za-z0-9+/=]+$/, 'Send the chart as a PNG data URL').max(3_000_000, 'The chart image is too large'),
}).noUnknown('Unknown field: ${unknown}')
