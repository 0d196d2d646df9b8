import type { TippingPoint } from '@shared/elicitation/tipping'
import type { Distribution, PriorDistribution, Support } from '@shared/stats'
import type { ModelLanguage } from '@shared/elicitation/model-code'
import type { RecordCaution } from '@shared/elicitation/record-cautions'
import type { CommentOutcome } from '@shared/schemas/records'
import { api } from './client'

/** Prior record, as GET /api/studies/:id/record answers (content: docs/prior-record.schema.json). */
export type RecordStatus = 'draft' | 'in_review' | 'signed_off'

export interface RecordMeta {
  version: number
  status: RecordStatus
  showNames: boolean
  rowVersion: number
  /** A draft sent back by a reviewer whose comments are not all answered yet. */
  returned: boolean
  /** Ids of the return comments the analyst answers when submitting again. */
  openComments: number[]
  /** SHA-256 of the frozen snapshot; null while the version is a draft. */
  contentHash: string | null
  /** SHA-256 of the content as shown now (a draft's changes as its data change). */
  liveHash: string
  submittedAt: string | null
  signedOffAt: string | null
  signedOffBy: string | null
  /** Hash of the newest audit event when the version was signed off. */
  auditHead: string | null
  basedOn: number | null
  /** Symbols whose density chart the server keeps for the .docx. */
  chartsFor: string[]
}

export interface ExpertRef {
  code: string
  name?: string | null
}

export interface PanelDeclaration {
  round: number
  expertise: string
  interests: 'none' | 'described'
  interestsText: string
  seenPilotData: boolean
  practice: { truthProbability: number; insideQuartiles: boolean } | null
}

export interface PanelMember extends ExpertRef {
  declarations: PanelDeclaration[]
}

export interface RecordRound {
  number: number
  title: string
  method: 'quantile' | 'fixed-interval' | 'chip-grid'
  edges: number[] | null
  chips: number | null
  opensAt: string | null
  closesAt: string | null
  feedback: boolean
}

export interface FitSummary {
  distribution: Distribution
  sse: number
  q05: number
  q50: number
  q95: number
  mean: number
  sd: number
  /** Where the fit contradicts the expert's plausible range (absent in records made before the rule). */
  warnings?: string[]
}

export interface RecordJudgement {
  round: number
  expert: ExpertRef
  method: RecordRound['method']
  answer: { lower?: number | null; upper?: number | null; points?: { value: number; prob: number }[]; edges?: number[]; probs?: (number | null)[]; chips?: number[] }
  rationale: string
  fit: FitSummary | null
  chosenByExpert?: boolean
}

export interface RecordCombination {
  round: number | null
  method: 'linear' | 'logarithmic' | 'consensus'
  weightsMode: 'equal' | 'performance' | 'custom'
  weights: number[]
  weightsReason: string
  cutoff: number
  excludedExperts: string[]
  consensus: { participants?: string; notes?: string } | null
  adjusted: boolean
  adjustReason: string
  rationale: string
  status: 'draft' | 'reconciled'
  /** Performance weights from fewer calibration questions or experts than the stated minimums. */
  weightCautions?: string[]
  /** Each weight with the expert it belongs to (records made before it was kept hold only `weights`). */
  expertWeights?: { expert: ExpertRef; weight: number }[]
}

export interface ModelCodeLine {
  language: ModelLanguage
  code: string
  check: { maxRelativeDifference: number; ok: boolean } | null
}

export interface FinalPrior {
  distribution: Distribution
  q05: number
  q50: number
  q95: number
  mean: number
  sd: number
  modelCode: ModelCodeLine[]
}

export interface ImpactCandidate {
  label: string
  kind?: string
  prior: PriorDistribution
  logEvidence: number
  posterior: { mean: number; sd: number; q025: number; q50: number; q975: number }
  bayesFactor: { logBF: number; twoLnBF: number; label: string } | null
  priorPredictiveP: number
  priorEss: number | null
  flags: string[]
  decision: { probability: number; act: boolean } | null
}

export interface RecordImpact {
  dataset: { name: string; version: number; model: string; summary?: { description?: string } }
  n: number
  candidates: ImpactCandidate[]
  sweep: { evidenceRatio: number; priorDriven: boolean; rule: string } | null
  tipping: TippingPoint | null
  decision: { direction: 'above' | 'below'; threshold: number; probability: number } | null
  findings: string[]
}

export interface RecordQuantity {
  name: string
  symbol: string
  unit: string
  question: string
  support: Support
  /** Set when the analyst left the quantity out of the record, with the reason the record states. */
  leftOut: { reason: string } | null
  assumptions: string
  evidenceNotes: string
  evidenceFiles: { filename: string; sha256: string; bytes: number }[]
  rounds: RecordRound[]
  judgements: RecordJudgement[]
  combination: RecordCombination | null
  finalPrior: FinalPrior | null
  pilotData: { name: string; version: number; model: string; rows: number; sha256: string }[]
  /** The analysis whose candidates include this very final prior; null when none exists. */
  impact: RecordImpact | null
  /** Without such an analysis, the analyst's recorded reason (absent in records stored before schema 1.1). */
  impactNotRunReason?: string | null
}

export interface RecordContent {
  $schema: string
  schemaVersion: string
  study: { title: string; context: string; owner: string }
  version: number
  namesShown: boolean
  panel: PanelMember[]
  calibration: { questions: { question: string; unit: string; trueValue: number | null }[]; method: string }
  quantities: RecordQuantity[]
  /** Plain text in records stored before schema 1.1. */
  cautions: (string | RecordCaution)[]
  /** What produced the record; absent before schema 1.1. */
  producedBy?: { application: string; version: string; engineVersion: string; commit?: string }
}

export interface RecordComment {
  id: number
  section: string
  body: string
  kind: 'comment' | 'return' | 'response'
  /** For an analyst's answer: the return comment it answers, and whether the record was changed. */
  replyTo: number | null
  outcome: CommentOutcome | null
  author: string
  createdAt: string
}

export interface RecordVersionSummary {
  version: number
  status: RecordStatus
  contentHash: string | null
  signedOffAt: string | null
}

export interface RecordView {
  record: RecordMeta
  content: RecordContent
  /** The study's quantities by symbol (the content names no database ids). */
  quantityIds: Record<string, number>
  comments: RecordComment[]
  versions: RecordVersionSummary[]
  auditChain: { intact: boolean; events: number; brokenAt: number | null }
  /** Events in words: `what` for the action, `subjectText` for what it concerns (experts by label unless names are shown). */
  changeHistory: { at: string; action: string; what: string; subject: string | null; subjectText: string; actor: string; hash: string }[]
}

/** Submitting for review; after a return, one answer per comment the record was returned with. */
export interface RecordSubmission {
  responses: { commentId: number; outcome: CommentOutcome; reply: string }[]
}

const base = (studyId: number) => `/api/studies/${studyId}/record`
const versionQuery = (version?: number) => (version === undefined ? '' : `?version=${version}`)

export const recordApi = {
  get: (studyId: number, version?: number) => api.get<RecordView>(`${base(studyId)}${versionQuery(version)}`),
  setShowNames: (studyId: number, showNames: boolean) => api.patch<RecordView>(base(studyId), { showNames }),
  submit: (studyId: number, body: RecordSubmission = { responses: [] }) => api.post<RecordView>(`${base(studyId)}/submit`, body),
  leaveOut: (studyId: number, body: { quantityId: number; reason: string }) => api.post<RecordView>(`${base(studyId)}/exclusions`, body),
  putBack: (studyId: number, quantityId: number) => api.delete<RecordView>(`${base(studyId)}/exclusions/${quantityId}`),
  returnRecord: (studyId: number, body: { section: string; comment: string }) => api.post<RecordView>(`${base(studyId)}/return`, body),
  signOff: (studyId: number) => api.post<RecordView>(`${base(studyId)}/sign-off`),
  comment: (studyId: number, body: { section: string; body: string }) => api.post<RecordView>(`${base(studyId)}/comments`, body),
  newVersion: (studyId: number) => api.post<RecordView>(`${base(studyId)}/new-version`),
  /** Stores a final prior's density chart (PNG data URL) for the .docx export. */
  saveChart: (studyId: number, body: { symbol: string; png: string }) => api.post<void>(`${base(studyId)}/charts`, body),
  docxUrl: (studyId: number, version?: number) => `/api/studies/${studyId}/record.docx${versionQuery(version)}`,
  jsonUrl: (studyId: number, version?: number) => `/api/studies/${studyId}/record.json${versionQuery(version)}`,
}
