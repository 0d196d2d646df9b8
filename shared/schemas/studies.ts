import { number, object, string, type InferType } from 'yup'
import { STUDY_ROLES } from '../types/index'
import { versionRule } from './quantities'

export const studySchema = object({
  title: string().trim().required('Enter a title').min(3, 'Use at least 3 characters').max(200, 'Use at most 200 characters'),
  context: string().trim().required('Describe the decision this study supports').max(5000, 'Use at most 5000 characters'),
}).noUnknown('Unknown field: ${unknown}')
export type StudyBody = InferType<typeof studySchema>

export const studyUpdateSchema = studySchema.shape({ version: versionRule })

export const studyMemberSchema = object({
  userId: number().typeError('Choose a user').required('Choose a user').integer().positive(),
  studyRole: string().required('Choose a study role').oneOf([...STUDY_ROLES], 'Choose analyst, expert or reviewer'),
}).noUnknown('Unknown field: ${unknown}')
