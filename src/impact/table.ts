import { describeDistribution } from '@shared/format'
import { DIAGNOSIS_WORDS, type SensitivityDiagnosis } from '@shared/stats'
import type { ImpactCandidate, ImpactResult } from '@/api/impact'

/** One candidate's numbers, as the table shows them and the CSV exports them (full precision). */
export interface CandidateRow {
  key: string
  kind: ImpactCandidate['kind']
  label: string
  prior: string
  priorMean: number
  priorQ025: number
  priorQ975: number
  postMean: number
  postSd: number
  postQ025: number
  postQ975: number
  logEvidence: number
  logBF: number | null
  bfLabel: string | null
  /** ln of the fractional Bayes factor against the comparison prior, and its training fraction b. */
  logFBF: number | null
  fbfB: number | null
  priorSensitivity: number | null
  likelihoodSensitivity: number | null
  diagnosis: SensitivityDiagnosis | null
  /** The diagnosis in plain words, or why the diagnostics are missing. */
  diagnosisText: string
  boxP: number
  /** ln of Box's p, finite where p underflows to 0. */
  logBoxP: number
  ess: number | null
  n: number
  decisionP: number | null
  act: boolean | null
  flags: string[]
}

export function candidateRows(result: Pick<ImpactResult, 'candidates' | 'n'>): CandidateRow[] {
  return result.candidates.map((c) => ({
    key: c.key,
    kind: c.kind,
    label: c.label,
    prior: describeDistribution(c.prior),
    priorMean: c.priorSummary.mean,
    priorQ025: c.priorSummary.q025,
    priorQ975: c.priorSummary.q975,
    postMean: c.posterior.mean,
    postSd: c.posterior.sd,
    postQ025: c.posterior.q025,
    postQ975: c.posterior.q975,
    logEvidence: c.logEvidence,
    logBF: c.bayesFactor?.logBF ?? null,
    bfLabel: c.bayesFactor?.label ?? null,
    // Analyses stored before the diagnostics existed have neither field.
    logFBF: c.fractionalBayesFactor?.logBF ?? null,
    fbfB: c.fractionalBayesFactor?.b ?? null,
    priorSensitivity: c.sensitivity?.prior ?? null,
    likelihoodSensitivity: c.sensitivity?.likelihood ?? null,
    diagnosis: c.sensitivity?.diagnosis ?? null,
    diagnosisText: c.sensitivity ? DIAGNOSIS_WORDS[c.sensitivity.diagnosis] : (c.diagnosticNotes ?? []).join(' '),
    boxP: c.priorPredictiveP,
    logBoxP: c.logPriorPredictiveP,
    ess: c.priorEss,
    n: result.n,
    decisionP: c.decision?.probability ?? null,
    act: c.decision?.act ?? null,
    flags: c.flags,
  }))
}

type Cell = string | number | boolean | null | undefined

/**
 * One CSV field (RFC 4180): quoted when it holds a comma, a quote or a line break, with quotes doubled.
 * Text that a spreadsheet would run as a formula (starting with =, +, @ or a tab) gets a leading apostrophe.
 */
export function csvCell(value: Cell): string {
  if (value === null || value === undefined) return ''
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : ''
  if (typeof value === 'boolean') return value ? 'true' : 'false'
  let text = value
  if (/^[=+@\t\r]/.test(text)) text = `'${text}`
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text
}

/** Rows of cells → CSV text with CRLF line ends. */
export function toCsv(rows: Cell[][]): string {
  return rows.map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n'
}

/** The candidates table as CSV: one row per candidate, numbers unrounded, the unit in the headers. */
export function candidatesCsv(rows: CandidateRow[], unit = ''): string {
  const u = unit ? ` (${unit})` : ''
  const header = [
    'candidate', 'kind', 'prior', `prior mean${u}`, `prior 2.5%${u}`, `prior 97.5%${u}`,
    `posterior mean${u}`, `posterior sd${u}`, `posterior 2.5%${u}`, `posterior 97.5%${u}`,
    'log evidence', 'log Bayes factor vs comparison prior', 'Bayes factor vs comparison prior', 'Kass-Raftery label',
    'log fractional Bayes factor vs comparison prior', 'fractional Bayes factor vs comparison prior', 'training fraction b',
    'prior sensitivity (power scaling)', 'likelihood sensitivity (power scaling)', 'sensitivity diagnosis',
    'prior predictive p (Box)', 'prior ESS', 'pilot n', 'P(decision rule)', 'act', 'flags',
  ]
  return toCsv([
    header,
    ...rows.map((r) => [
      r.label, r.kind, r.prior, r.priorMean, r.priorQ025, r.priorQ975, r.postMean, r.postSd, r.postQ025, r.postQ975,
      r.logEvidence, r.logBF, r.logBF === null ? null : Math.exp(r.logBF), r.bfLabel,
      r.logFBF, r.logFBF === null ? null : Math.exp(r.logFBF), r.fbfB, r.priorSensitivity, r.likelihoodSensitivity, r.diagnosisText, r.boxP, r.ess, r.n, r.decisionP, r.act, r.flags.join('; '),
    ]),
  ])
}

/** Saves text as a file through a temporary link (no server round trip). */
export function downloadText(text: string, filename: string, type = 'text/csv;charset=utf-8'): void {
  const url = URL.createObjectURL(new Blob(['\uFEFF', text], { type }))
  downloadUrl(url, filename)
  setTimeout(() => URL.revokeObjectURL(url), 1000)
}

export function downloadUrl(url: string, filename: string): void {
  const a = document.createElement('a')
  a.href = url
  a.download = filename
  a.rel = 'noopener'
  document.body.appendChild(a)
  a.click()
  a.remove()
}

/** "impact-burst_rate-v2": a file name from the quantity's symbol and the dataset version. */
export function fileStem(symbol: string, datasetVersion: number): string {
  return `impact-${symbol.replace(/[^A-Za-z0-9_-]+/g, '_')}-v${datasetVersion}`
}
