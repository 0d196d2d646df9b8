import type { PriorDistribution } from '../stats/index'

/**
 * The prior record in words: numbers, distributions, answers, flags and audit events as the screen and the .docx
 * both write them, so neither shows an internal key.
 */

/** Numbers in the record: `digits` significant digits, exponent only for very large or very small values. */
export function fmt(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined) return '—'
  if (!Number.isFinite(x)) return String(x)
  const abs = Math.abs(x)
  if (abs !== 0 && (abs >= 1e6 || abs < 1e-3)) return x.toExponential(Math.max(0, digits - 2))
  return Number(x.toPrecision(digits)).toString()
}

/** A probability in a table: a decimal (0.048, 0.95), never a percentage. */
export function fmtProb(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '—'
  if (p !== 0 && p < 0.001) return p.toExponential(1)
  return Number(p.toPrecision(3)).toString()
}

/** The distribution in words with its parameters: "Normal(mean 3.2, sd 1.1)". */
export function describeDistribution(d: PriorDistribution | null | undefined): string {
  if (!d) return '—'
  switch (d.family) {
    case 'normal':
      return `Normal(mean ${fmt(d.mu, 6)}, sd ${fmt(d.sigma, 6)})`
    case 'student-t':
      return `Student-t(df ${fmt(d.df)}, location ${fmt(d.mu, 6)}, scale ${fmt(d.sigma, 6)})`
    case 'lognormal':
      return `Lognormal(meanlog ${fmt(d.meanlog, 6)}, sdlog ${fmt(d.sdlog, 6)})`
    case 'gamma':
      return `Gamma(shape ${fmt(d.shape, 6)}, rate ${fmt(d.rate, 6)})`
    case 'beta':
      return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)})`
    case 'scaled-beta':
      return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)}) on [${fmt(d.lower)}, ${fmt(d.upper)}]`
    case 'uniform':
      return `Uniform(${fmt(d.lower, 6)}, ${fmt(d.upper, 6)})`
    case 'half-normal':
      return `Half-normal(scale ${fmt(d.scale, 6)})`
  }
}

export type ElicitedAnswer = {
  lower?: number | null
  upper?: number | null
  points?: { value: number; prob: number }[]
  edges?: number[]
  probs?: (number | null)[]
  chips?: number[]
}

/**
 * An expert's answer as given, in one line: the plausible bounds and the elicited values with their cumulative
 * probabilities, or each interval with its probability or its chips.
 */
export function answerText(method: string, answer: ElicitedAnswer | null | undefined): string {
  const a = answer ?? {}
  const hasBounds = a.lower !== undefined && a.lower !== null && a.upper !== undefined && a.upper !== null
  const bounds = hasBounds ? `plausible range ${fmt(a.lower, 5)} to ${fmt(a.upper, 5)}` : ''
  if (a.points && a.points.length) {
    const pts = a.points.map((p) => `${fmt(p.value, 5)} at ${fmtProb(p.prob)}`).join('; ')
    return [bounds, pts].filter(Boolean).join('; ')
  }
  if (a.edges && a.edges.length > 1) {
    const chips = method === 'chip-grid'
    const values = chips ? a.chips : a.probs
    const intervals = a.edges.slice(0, -1).map((e, i) => {
      const v = values?.[i]
      const shown = v === null || v === undefined ? '—' : chips ? `${v} ${v === 1 ? 'chip' : 'chips'}` : fmtProb(v)
      return `[${fmt(e, 5)}, ${fmt(a.edges![i + 1], 5)}): ${shown}`
    }).join('; ')
    return [bounds, intervals].filter(Boolean).join('; ')
  }
  return bounds || '—'
}

/** Caution flags of a candidate prior, in words. */
export const FLAG_LABELS: Record<string, string> = {
  'prior-dominates': 'Prior dominates the data (prior ESS larger than n; Priorsmith’s rule of thumb)',
  'prior-data-conflict': 'Prior–data conflict (Box p < 0.05, the customary level)',
  'prior-driven-bayes-factor': 'Bayes factor driven by the prior’s width (Priorsmith’s rule of thumb)',
}

export const flagLabel = (flag: string): string => FLAG_LABELS[flag] ?? humanise(flag)

export const WEIGHTS_LABELS: Record<string, string> = {
  equal: 'Equal weights',
  performance: 'Performance weights (Cooke’s classical model)',
  custom: 'Weights set by the analyst',
}

export const SUPPORT_LABELS: Record<string, string> = {
  real: 'any real number',
  positive: 'positive values',
  proportion: 'a proportion between 0 and 1',
  bounded: 'bounded',
}

export const CANDIDATE_KIND_LABELS: Record<string, string> = {
  expert: 'One expert’s prior',
  pooled: 'Pooled prior',
  consensus: 'Agreed consensus',
  reconciled: 'Final prior',
  comparison: 'Comparison prior',
  mixture: 'Robust mixture',
}

/** Audit actions in words ("record.sign-off" → "Record signed off"), for the audit screen, the record and its .docx. */
export const AUDIT_ACTIONS: Record<string, string> = {
  'auth.sign-in': 'Signed in',
  'auth.sign-in-failed': 'Sign-in failed',
  'auth.sign-out': 'Signed out',
  'user.create': 'Account created',
  'user.update': 'Account changed',
  'study.create': 'Study created',
  'study.update': 'Study edited',
  'study.member': 'Member added or role changed',
  'study.member-remove': 'Member removed',
  'quantity.create': 'Quantity created',
  'quantity.update': 'Quantity edited',
  'evidence.upload': 'Evidence file uploaded',
  'evidence.delete': 'Evidence file deleted',
  'calibration.create': 'Calibration question added',
  'calibration.update': 'Calibration question edited',
  'composition.create': 'Composition (shares of a whole) created',
  'composition.update': 'Composition edited',
  'composition.delete': 'Composition deleted',
  'round.create': 'Round scheduled',
  'round.update': 'Round edited',
  'round.extend': 'Round extended',
  'round.open': 'Round opened',
  'round.close': 'Round closed',
  'round.reopen': 'Round reopened',
  'round.reminders': 'Reminders sent',
  'round.submit': 'Expert submitted answers',
  'panel.add': 'Expert added to panel',
  'panel.remove': 'Expert removed from panel',
  'invitation.resend': 'Invitation sent again',
  'invitation.revoke': 'Invitation revoked',
  'invitation.accept': 'Invitation accepted',
  'declaration.save': 'Expert declaration saved',
  'practice.complete': 'Practice question completed',
  'feedback.view': 'Feedback from the earlier round viewed',
  'judgement.save': 'Judgement saved',
  'judgement.submit': 'Judgements submitted',
  'dataset.upload': 'Pilot data uploaded',
  'impact.run': 'Impact analysis run',
  'reconciliation.save': 'Reconciliation saved',
  'reconciliation.reconciled': 'Final prior chosen',
  'record.submit': 'Record submitted for review',
  'record.return': 'Record returned with comments',
  'record.sign-off': 'Record signed off',
  'record.comment': 'Comment on the record',
  'record.names': 'Expert names shown or hidden',
  'record.new-version': 'New record version started',
  'record.leave-out': 'Quantity left out of the record',
  'record.put-back': 'Quantity put back into the record',
  'record.reworded': 'Stored record reworded by a software update (old and new SHA-256 in the audit event)',
}

const humanise = (key: string) => {
  const text = key.replace(/[._-]+/g, ' ').trim()
  return text.charAt(0).toUpperCase() + text.slice(1)
}

export const actionLabel = (action: string): string => AUDIT_ACTIONS[action] ?? humanise(action)

/** Names of the study's objects an audit subject may point at, by id. */
export interface SubjectNames {
  quantities?: Record<number, string>
  rounds?: Record<number, string>
  calibration?: Record<number, string>
  users?: Record<number, string>
}

/**
 * What an audit event concerns, in words: "quantity:4" → "Night-flow reduction", "record:v2" → "record version 2";
 * an id with no name known here reads "quantity no. 4".
 */
export function subjectLabel(subject: string | null | undefined, names: SubjectNames = {}): string {
  if (!subject) return ''
  const m = /^([a-z-]+):(v?)(\d+)$/.exec(subject)
  if (!m) return humanise(subject)
  const [, kind, , idText] = m
  const id = Number(idText)
  if (kind === 'record') return `record version ${id}`
  const table: Record<string, [keyof SubjectNames | null, string]> = {
    quantity: ['quantities', 'quantity'], round: ['rounds', 'round'], calibration: ['calibration', 'calibration question'], user: ['users', 'user'], study: [null, 'this study'],
  }
  const [key, word] = table[kind] ?? [null, humanise(kind).toLowerCase()]
  if (kind === 'study') return word
  const name = key ? names[key]?.[id] : undefined
  return name ?? `${word} no. ${id}`
}

export const LANGUAGE_LABELS: Record<string, string> = { stan: 'Stan', pymc: 'PyMC', jags: 'JAGS', brms: 'brms' }

/**
 * A moment as local date and time in an IANA time zone, with the zone named: "3 December 2026, 09:15 (Europe/Oslo)";
 * `seconds` adds them (audit events often share a minute). Assembled from parts so ICU versions cannot change it.
 */
export function dateTimeIn(value: string | Date | null | undefined, timeZone: string, seconds = false): string {
  if (value === null || value === undefined) return '—'
  const d = new Date(value)
  if (Number.isNaN(d.getTime())) return String(value)
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone, day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit', second: seconds ? '2-digit' : undefined, hourCycle: 'h23',
  }).formatToParts(d)
  const get = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? ''
  return `${get('day')} ${get('month')} ${get('year')}, ${get('hour')}:${get('minute')}${seconds ? `:${get('second')}` : ''} (${timeZone})`
}
