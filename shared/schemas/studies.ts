import { object, string, type InferType } from 'yup'

export const studySchema = object({
  title: string().trim().required('Enter a title').min(3, 'Use at least 3 characters').max(200, 'Use at most 200 characters'),
  context: string().trim().required('Describe the decision this study supports').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')
export type StudyBody = InferType<typeof studySchema>
