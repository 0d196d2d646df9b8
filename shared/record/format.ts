import { REPAIR_EIGENVALUE_FLOOR } from '../elicitation/linked-sets'
import { formatNumber, formatPercent, formatPercentPoints, formatProbability } from '../format/numbers'

/**
 * The prior record in words: answers, flags, audit events and their subjects as the screen and the .docx both write
 * them, so neither shows an internal key (numbers, dates and distributions come from shared/format).
 */

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
  const bounds = hasBounds ? `plausible range ${formatNumber(a.lower, 5)} to ${formatNumber(a.upper, 5)}` : ''
  if (a.points && a.points.length) {
    const pts = a.points.map((p) => `${formatNumber(p.value, 5)} at ${formatProbability(p.prob)}`).join('; ')
    return [bounds, pts].filter(Boolean).join('; ')
  }
  if (a.edges && a.edges.length > 1) {
    const chips = method === 'chip-grid'
    const values = chips ? a.chips : a.probs
    const intervals = a.edges.slice(0, -1).map((e, i) => {
      const v = values?.[i]
      const shown = v === null || v === undefined ? '—' : chips ? `${v} ${v === 1 ? 'chip' : 'chips'}` : formatProbability(v)
      return `[${formatNumber(e, 5)}, ${formatNumber(a.edges![i + 1], 5)}): ${shown}`
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
  'composition.dataset-upload': 'Pilot counts of a composition uploaded',
  'composition.impact': 'Impact of a composition prior run',
  'link.create': 'Two quantities of a round linked',
  'link.update': 'Round link edited',
  'link.delete': 'Round link removed',
  'link.reorder': 'Round links reordered',
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
  'impact.cancel': 'Impact analysis cancelled',
  'reconciliation.save': 'Reconciliation saved',
  'reconciliation.reconciled': 'Final prior chosen',
  'link.confirm': 'Pooled correlation of a linked pair confirmed',
  'link.override': 'Correlation of a linked pair set by the analyst',
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

/** A Dirichlet by its concentrations: "Dirichlet(12.4, 8.27, 20.6)". */
export const dirichletText = (alpha: number[]): string => `Dirichlet(${alpha.map((a) => formatNumber(a)).join(', ')})`

/** A composition's Dirichlet in one plain sentence: its concentrations, what the total is worth, and how the means were scaled. */
export function compositionDirichletText(
  dirichlet: { alpha: number[]; totalConcentration: number; meanSum: number },
  residualName: string | null,
): string {
  const scaled = residualName === null
    ? `The reconciled shares' means add up to ${formatPercentPoints(100 * dirichlet.meanSum)} and are scaled to add up to 100 %.`
    : `The reconciled shares' means add up to ${formatPercentPoints(100 * dirichlet.meanSum)}; the rest goes to ${residualName}.`
  return `${dirichletText(dirichlet.alpha)}: total concentration ${formatNumber(dirichlet.totalConcentration)}, worth about ${formatNumber(dirichlet.totalConcentration, 2)} observations of which share each falls in. ${scaled}`
}

/** The read-back check of a joint prior's model code (its parameters taken back out of the line), in words. */
export function jointCheckText(check: { ok: boolean; maxRelativeDifference: number } | null): string {
  if (!check) return 'not available'
  return check.ok ? `passed: the same parameters come out of the code (largest relative difference ${formatNumber(check.maxRelativeDifference, 2)})` : 'FAILED: the parameters that come out differ; do not use this code'
}

/** A composition's impact: the Bayes factor of its Dirichlet against the comparison prior, in words. */
export function compositionBayesFactorText(impact: { bayesFactor: { logBF: number; label: string; favours: 'prior' | 'comparison' }; comparison: { alpha: number[] } }): string {
  const bf = impact.bayesFactor
  const by = formatNumber(Math.exp(Math.abs(bf.logBF)), 3)
  return `The counts favour ${bf.favours === 'prior' ? `the elicited Dirichlet over the comparison prior ${dirichletText(impact.comparison.alpha)}` : `the comparison prior ${dirichletText(impact.comparison.alpha)} over the elicited Dirichlet`} by a Bayes factor of ${by} (${bf.label} on the Kass–Raftery scale; log Bayes factor ${formatNumber(bf.logBF, 4)}).`
}

/** The width sweep of a composition's Dirichlet, in words (the rule is Priorsmith's convention, docs/methods/joint-priors.md). */
export function compositionSweepText(sweep: { evidenceRatio: number; priorDriven: boolean }): string {
  return `Width sweep (the total concentration divided by k² at width factor k from 0.25 to 8, means kept): the evidence changes by a factor ${formatNumber(sweep.evidenceRatio, 4)} from half to twice the width; ${sweep.priorDriven ? 'so a Bayes factor built on this Dirichlet reflects its width more than the counts (Priorsmith’s rule of thumb).' : 'Bayes factors built on this Dirichlet are not driven by its width.'}`
}

/** What the record's joint-priors section states first, on the page and in the .docx. */
export const JOINT_PRIORS_INTRO =
  'Quantities whose priors are stated together. Shares of a whole have one Dirichlet prior for all of them, fitted to the shares’ reconciled priors: use the Dirichlet rather than the shares’ own priors in a model that needs the shares to add up to one. Quantities that move together keep their own reconciled priors, joined by a Gaussian copula whose correlations come from the experts’ answers to a conditional question: use the joint prior where the model has both quantities.'

/** Where the correlation a link's row of the matrix uses comes from, in words. */
export const LINK_SOURCE_LABELS: Record<string, string> = {
  confirmed: 'the experts’ pooled value, confirmed by the analyst',
  overridden: 'set by the analyst',
  pooled: 'the experts’ pooled value, not confirmed yet',
  none: 'nobody answered; 0 until the analyst sets it',
}

/** An expert's answer to a link's question in one line: "Expert 1: 80 % (correlation 0.809, weight 0.5)". */
export function linkAnswerText(a: { probability: number; correlation: number; weight: number }, label: string): string {
  return `${label}: ${formatPercent(a.probability)} (correlation ${formatNumber(a.correlation, 3)}, weight ${formatNumber(a.weight, 3)})`
}

/** The caption of a link's scatter in the record: how many seeded draws, which quantity goes where, what the frame holds. */
export function linkScatterCaption(first: { name: string; symbol: string }, second: { name: string; symbol: string }, draws: { seed: number; n: number }): string {
  return `${draws.n} joint draws (seed ${draws.seed}) from the linked set’s joint prior: ${first.name} (${first.symbol}) across, ${second.name} (${second.symbol}) up. The frame holds the middle 99 % of the draws on each axis.`
}

/** A correlation matrix's repair in words (nearest correlation matrix, Higham 2002, with Priorsmith's eigenvalue floor). */
export function correlationRepairText(minEigenvalue: number, maxChange: number): string {
  return `The correlations as decided cannot all hold together (the matrix's smallest eigenvalue is ${formatNumber(minEigenvalue, 3)}, below 0). The joint prior uses the nearest correlation matrix (Higham 2002) with its eigenvalues raised to at least ${formatNumber(REPAIR_EIGENVALUE_FLOOR)} so that a multivariate normal accepts it; its entries moved by up to ${formatNumber(maxChange, 3)}.`
}
