import { posteriorOf, scaleSpread, sd as distSd, type Distribution, type PilotData, type PriorDistribution, type Support } from '../stats/index'
import type { DecisionRule } from './impact'

function probability(prior: PriorDistribution, data: PilotData, rule: DecisionRule): number {
  const below = posteriorOf(prior, data).cdf(rule.threshold)
  return rule.direction === 'above' ? 1 - below : below
}

/** The prior's centre moved by `shift` (in the family's natural location: mean, log-median, or scale). */
function shiftCentre(d: Distribution, shift: number): Distribution | null {
  switch (d.family) {
    case 'normal':
    case 'student-t':
      return { ...d, mu: d.mu + shift }
    case 'lognormal':
      return { ...d, meanlog: d.meanlog + shift }
    case 'gamma':
      return { ...d, rate: d.rate * Math.exp(-shift) }
    default:
      return null
  }
}

/** Bisection for the first parameter in [a, b] where the decision differs from the one at a. */
function firstFlip(f: (t: number) => boolean, a: number, b: number): number | null {
  const start = f(a)
  if (f(b) === start) return null
  let lo = a
  let hi = b
  for (let i = 0; i < 50; i++) {
    const mid = (lo + hi) / 2
    if (f(mid) === start) lo = mid
    else hi = mid
  }
  return hi
}

export interface TippingPoint {
  actNow: boolean
  probabilityNow: number
  /** Spread factor k at which the decision flips (1 < k ≤ 20), or null if it holds up to 20× the width. */
  spreadFactor: number | null
  /** Shift of the centre toward the sceptical side, in prior standard deviations (normal, t) or as a factor on the median (lognormal, gamma). */
  centreShift: { amount: number; unit: 'prior sd' | 'factor on the median' } | null
  centreNote: string | null
}

/**
 * How far the reconciled prior must move toward scepticism (its centre against the decision, or its spread
 * wider) before the decision under the rule flips.
 */
export function tippingPoint(prior: Distribution, data: PilotData, rule: DecisionRule, support?: Support): TippingPoint {
  const pNow = probability(prior, data, rule)
  const actNow = pNow > rule.probability
  const acts = (d: PriorDistribution) => probability(d, data, rule) > rule.probability
  const spreadFactor = firstFlip((k) => acts(scaleSpread(prior, k, support)), 1, 20)
  // Sceptical means: against acting when the decision is to act, toward acting otherwise.
  const towardLow = (rule.direction === 'above') === actNow
  const sign = towardLow ? -1 : 1
  let centreShift: TippingPoint['centreShift'] = null
  let centreNote: string | null = null
  if (prior.family === 'normal' || prior.family === 'student-t') {
    const unit = distSd(prior) || prior.sigma
    const t = firstFlip((s) => acts(shiftCentre(prior, sign * s * unit)!), 0, 10)
    if (t !== null) centreShift = { amount: sign * t, unit: 'prior sd' }
    else centreNote = 'The decision holds even with the centre moved 10 prior standard deviations.'
  } else if (prior.family === 'lognormal' || prior.family === 'gamma') {
    const t = firstFlip((s) => acts(shiftCentre(prior, sign * s)!), 0, Math.log(100))
    if (t !== null) centreShift = { amount: Math.exp(sign * t), unit: 'factor on the median' }
    else centreNote = 'The decision holds even with the median moved by a factor of 100.'
  } else {
    centreNote = `A centre shift is not defined for the ${prior.family} family here; the spread test still applies.`
  }
  return { actNow, probabilityNow: pNow, spreadFactor, centreShift, centreNote }
}
