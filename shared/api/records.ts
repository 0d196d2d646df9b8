import type { AnswerInput } from '../elicitation/answers'
import type { CompositionModelLine } from '../elicitation/composition-prior'
import type { DecisionRule } from '../elicitation/impact'
import type { ModelLanguage } from '../elicitation/model-code'
import type { PilotModel, PilotSummary } from '../elicitation/pilot'
import type { RecordCaution } from '../elicitation/record-cautions'
import type { TippingPoint } from '../elicitation/tipping'
import type { CommentOutcome } from '../schemas/records'
import type { ElicitationMethod } from '../schemas/rounds'
import type { FractionalBayesFactor, PowerScalingSensitivity } from '../stats/sensitivity'
import type { Distribution, FitResult, PriorDistribution, Support } from '../stats/types'
import type { AuditChainCheck, ChangeHistoryEntry } from './audit'
import type { CandidateKind } from './impact'
import type { Consensus, PoolMethod, ReconciliationStatus, WeightsMode } from './reconciliation'

/**
 * The prior record: its content as the server assembles it (docs/prior-record.schema.json) and the record page's
 * response (GET /api/studies/:id/record and every record action). A stored snapshot keeps the shape of its schema
 * version, so fields added later are optional here.
 */

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

/** An expert as the record names them: the study-wide label, and the name when the analyst shows names. */
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

export interface RecordPanelMember extends ExpertRef {
  declarations: PanelDeclaration[]
}

export interface RecordRound {
  number: number
  title: string
  method: ElicitationMethod
  edges: number[] | null
  chips: number | null
  opensAt: string | null
  closesAt: string | null
  feedback: boolean
  /** The round's own time zone, in which the .docx writes its window (absent for rounds made before rounds had one). */
  timeZone?: string
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
  method: ElicitationMethod
  answer: AnswerInput
  rationale: string
  fit: FitSummary | null
  chosenByExpert?: boolean
}

export interface RecordCombination {
  round: number | null
  method: PoolMethod
  weightsMode: WeightsMode
  weights: number[]
  weightsReason: string
  cutoff: number
  /** Left-out experts by label. */
  excludedExperts: string[]
  consensus: Consensus | null
  /** The families fitted to the combination. */
  fitsOfCombination?: FitResult[]
  adjusted: boolean
  adjustReason: string
  rationale: string
  status: ReconciliationStatus
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

/** A candidate prior of the impact analysis, as the record keeps it. */
export interface RecordImpactCandidate {
  label: string
  kind: CandidateKind
  prior: PriorDistribution
  logEvidence: number
  posterior: { mean: number; sd: number; q025: number; q50: number; q975: number }
  bayesFactor: { logBF: number; twoLnBF: number; label: string } | null
  priorPredictiveP: number
  priorEss: number | null
  flags: string[]
  decision: { probability: number; act: boolean } | null
  /** Null for the comparison prior; absent in records of analyses run before the diagnostics. */
  fractionalBayesFactor?: FractionalBayesFactor | null
  sensitivity?: PowerScalingSensitivity | null
}

export interface RecordImpact {
  /** The hash of everything the analysis's numbers depend on (absent in early records). */
  inputHash?: string
  dataset: { name: string; version: number; model: PilotModel; summary?: PilotSummary }
  n: number
  candidates: RecordImpactCandidate[]
  sweep: { evidenceRatio: number; priorDriven: boolean; rule: string; fractionalRatio?: number | null; trainingFraction?: number | null } | null
  /** That the diagnostics are aids to judgement, not tests; null or absent without them. */
  diagnosticsCaution?: string | null
  tipping: TippingPoint | null
  decision: DecisionRule | null
  findings: string[]
}

export interface RecordPilotData {
  name: string
  version: number
  model: PilotModel
  rows: number
  summary?: PilotSummary
  sha256: string
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
  pilotData: RecordPilotData[]
  /** The analysis whose candidates include this very final prior; null when none exists. */
  impact: RecordImpact | null
  /** Without such an analysis, the analyst's recorded reason (absent in records stored before schema 1.1). */
  impactNotRunReason?: string | null
}

/** A share of a composition in the record: its reconciled prior beside the Dirichlet's share. */
export interface RecordCompositionShare {
  name: string
  /** The share's quantity symbol; null for the "other" share, which nobody was asked about. */
  symbol: string | null
  /** The share's reconciled prior (null for the "other" share or a share not reconciled yet). */
  prior: Distribution | null
  /** Mean of the reconciled prior, before the shares are scaled to add up to 1. */
  elicitedMean: number | null
  alpha: number | null
  /** αᵢ / Σα: the share's mean under the Dirichlet. */
  dirichletMean: number | null
  /** The Dirichlet's beta marginal for this share. */
  marginal: Distribution | null
  /** Largest |F_Dirichlet(q) − p| at the share's own 5/25/50/75/95 % quantiles (probability scale). */
  mismatch: number | null
  /** Concentration the share's own mean and variance imply: m(1 − m)/v − 1. */
  impliedConcentration: number | null
}

/** The newest impact analysis of the composition's Dirichlet on multinomial pilot counts, run on this very Dirichlet. */
export interface RecordCompositionImpact {
  dataset: { name: string; version: number; rows: number; summary: PilotSummary; sha256: string }
  observations: number
  /** The composition's Dirichlet: log evidence of the counts as recorded, prior ESS (Σα) and each share's posterior. */
  prior: { label: string; alpha: number[]; logEvidence: number; priorEss: number; posteriorAlpha: number[]; posterior: { mean: number; sd: number; q025: number; q975: number }[] }
  comparison: { label: string; alpha: number[]; logEvidence: number }
  /** The Dirichlet against the comparison prior: logBF its natural logarithm, label the Kass–Raftery category of |2 ln BF|. */
  bayesFactor: { logBF: number; twoLnBF: number; label: string; favours: 'prior' | 'comparison' }
  sweep: { evidenceRatio: number; priorDriven: boolean; points: { factor: number; totalConcentration: number; logEvidence: number; logBFvsComparison: number }[] }
  flags: string[]
  findings: string[]
}

/** A composition (shares of a whole) in the record: its Dirichlet when it is part of the prior, else why not. */
export interface RecordComposition {
  name: string
  wording: string
  /** The model's name for the simplex, derived from the composition's name. */
  symbol: string
  /** A last "other" share takes what the listed shares leave. */
  residual: boolean
  shares: RecordCompositionShare[]
  /** True when every share is reconciled, none is left out of the record, and the Dirichlet could be fitted. */
  inPrior: boolean
  /** Why the composition is not part of the prior; null when it is. */
  notInPriorReason: string | null
  dirichlet: { alpha: number[]; totalConcentration: number; meanSum: number; warnings: { code: string; message: string }[] } | null
  /** The Dirichlet in each language with its read-back check; empty when the composition is not part of the prior. */
  modelCode: CompositionModelLine[]
  impact: RecordCompositionImpact | null
}

/** An expert's answer to a link's conditional question, under the study's label. */
export interface RecordLinkAnswer {
  expert: ExpertRef
  /** P(second above the expert's median | first above theirs). */
  probability: number
  /** The Gaussian-copula correlation it means: sin(π(p − 1/2)). */
  correlation: number
  /** The expert's share of the pool. */
  weight: number
}

/** One link of a linked set: the question, the experts' answers, their pool and the analyst's decision. */
export interface RecordLink {
  round: number
  first: { name: string; symbol: string }
  second: { name: string; symbol: string }
  wording: string
  answers: RecordLinkAnswer[]
  weightRule: string
  /** tanh(Σ wᵢ atanh ρᵢ) on Fisher's z scale; null when no expert with weight answered. */
  pooledCorrelation: number | null
  /** confirmed or overridden by the analyst; pooled or none when the analyst has not decided (not part of the prior). */
  source: 'confirmed' | 'overridden' | 'pooled' | 'none'
  /** An override's reason (empty for a confirmation). */
  reason: string
  /** A confirmation whose pooled value changed since: it must be confirmed again. */
  stale: boolean
  /** The correlation the set's matrix uses. */
  correlation: number
}

/** Quantities joined by links, with their correlation matrix, its repair, the scatter's seeded draws and the model code. */
export interface RecordLinkedSet {
  /** The model's name for the set's vector. */
  name: string
  /** The quantities in the matrix's order, with the reconciled prior each enters with. */
  quantities: { name: string; symbol: string; distribution: Distribution | null }[]
  links: RecordLink[]
  /** The correlations as decided: 1 on the diagonal, 0 for pairs no link joins. */
  matrix: number[][]
  unlinkedPairs: { first: string; second: string }[]
  positiveSemiDefinite: boolean
  minEigenvalue: number
  /** The nearest correlation matrix (Higham 2002) when the decided one is not positive semi-definite, with each entry's change. */
  repair: { matrix: number[][]; changes: number[][]; maxChange: number; iterations: number } | null
  /** The matrix the joint prior uses: the repaired one when a repair was needed. */
  jointMatrix: number[][]
  inPrior: boolean
  notInPriorReason: string | null
  /** The seeded joint draws the record's scatter shows (sampleJoint with this seed and n); null when not part of the prior. */
  draws: { seed: number; n: number } | null
  modelCode: { language: ModelLanguage; form: 'multivariate-normal' | 'gaussian-copula'; code: string; check: { ok: boolean; maxRelativeDifference: number } | null }[]
}

/** What produced the record. */
export interface ProducedBy {
  application: string
  version: string
  engineVersion: string
  commit?: string
}

export interface RecordContent {
  $schema: string
  schemaVersion: string
  study: { title: string; context: string; owner: string }
  version: number
  namesShown: boolean
  panel: RecordPanelMember[]
  calibration: { questions: { question: string; unit: string; trueValue: number | null }[]; method: string }
  quantities: RecordQuantity[]
  /** Plain text in records stored before schema 1.1. */
  cautions: (string | RecordCaution)[]
  /** Absent before schema 1.1. */
  producedBy?: ProducedBy
  /** The study's compositions (shares of a whole); absent before schema 1.2. */
  compositions?: RecordComposition[]
  /** The study's linked sets (quantities that move together); absent before schema 1.2. */
  linkedSets?: RecordLinkedSet[]
}

export type CommentKind = 'comment' | 'return' | 'response'

export interface RecordComment {
  id: number
  section: string
  body: string
  kind: CommentKind
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

/** GET /api/studies/:id/record and the answer of every record action. */
export interface RecordView {
  record: RecordMeta
  content: RecordContent
  /** The study's quantities by symbol (the content names no database ids). */
  quantityIds: Record<string, number>
  comments: RecordComment[]
  versions: RecordVersionSummary[]
  auditChain: AuditChainCheck
  changeHistory: ChangeHistoryEntry[]
}

/** The record's facts beside its content in the JSON export (GET /api/studies/:id/record.json) and the .docx. */
export interface RecordExportMeta {
  version: number
  status: RecordStatus
  contentHash: string | null
  signedOffAt: string | null
  signedOffBy: string | null
  auditHead: string | null
}

/** GET /api/studies/:id/record.json: the content with the record's facts. */
export type RecordExport = RecordContent & { record: RecordExportMeta }

/** Body of POST …/record/submit: after a return, one answer per comment the record was returned with. */
export interface RecordSubmission {
  responses: { commentId: number; outcome: CommentOutcome; reply: string }[]
}

/** Body of POST …/record/exclusions. */
export interface RecordExclusionBody {
  quantityId: number
  reason: string
}

/** Body of POST …/record/return. */
export interface RecordReturnBody {
  section: string
  comment: string
}

/** Body of POST …/record/comments. */
export interface RecordCommentBody {
  section: string
  body: string
}

/** Body of POST …/record/charts: a final prior's density chart as a PNG data URL, for the .docx. */
export interface RecordChartBody {
  symbol: string
  png: string
}
