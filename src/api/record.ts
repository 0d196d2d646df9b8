import type {
  RecordChartBody, RecordCommentBody, RecordExclusionBody, RecordReturnBody, RecordSubmission, RecordView,
} from '@shared/api/records'
import { api } from './client'

export type {
  FinalPrior, RecordComment, RecordComposition, RecordContent, RecordLinkedSet, RecordImpact, RecordQuantity, RecordRound, RecordStatus, RecordSubmission, RecordView,
} from '@shared/api/records'

const base = (studyId: number) => `/api/studies/${studyId}/record`
const versionQuery = (version?: number) => (version === undefined ? '' : `?version=${version}`)

export const recordApi = {
  get: (studyId: number, version?: number) => api.get<RecordView>(`${base(studyId)}${versionQuery(version)}`),
  setShowNames: (studyId: number, showNames: boolean) => api.patch<RecordView>(base(studyId), { showNames }),
  submit: (studyId: number, body: RecordSubmission = { responses: [] }) => api.post<RecordView>(`${base(studyId)}/submit`, body),
  leaveOut: (studyId: number, body: RecordExclusionBody) => api.post<RecordView>(`${base(studyId)}/exclusions`, body),
  putBack: (studyId: number, quantityId: number) => api.delete<RecordView>(`${base(studyId)}/exclusions/${quantityId}`),
  returnRecord: (studyId: number, body: RecordReturnBody) => api.post<RecordView>(`${base(studyId)}/return`, body),
  signOff: (studyId: number) => api.post<RecordView>(`${base(studyId)}/sign-off`),
  comment: (studyId: number, body: RecordCommentBody) => api.post<RecordView>(`${base(studyId)}/comments`, body),
  newVersion: (studyId: number) => api.post<RecordView>(`${base(studyId)}/new-version`),
  /** Stores a final prior's density chart (PNG data URL) for the .docx export. */
  saveChart: (studyId: number, body: RecordChartBody) => api.post<void>(`${base(studyId)}/charts`, body),
  docxUrl: (studyId: number, version?: number) => `/api/studies/${studyId}/record.docx${versionQuery(version)}`,
  jsonUrl: (studyId: number, version?: number) => `/api/studies/${studyId}/record.json${versionQuery(version)}`,
}
