import { EngineInputError } from './errors'
import { mixture } from './pool'
import { gammaPQ } from './special'
import type { CookeInput, CookeResult, Pool, Univariate } from './types'

/** Inter-quantile bin probabilities (q₁, q₂ − q₁, …, 1 − q_k). */
export function binProbabilities(quantiles: number[]): number[] {
  const out = [quantiles[0]]
  for (let j = 1; j < quantiles.length; j++) out.push(quantiles[j] - quantiles[j - 1])
  out.push(1 - quantiles[quantiles.length - 1])
  return out
}

/** Relative information I(s, p) = Σ s_j ln(s_j / p_j), with 0 ln 0 = 0 (Cooke 1991, ch. 12). */
export function relativeInformation(s: number[], p: number[]): number {
  let total = 0
  for (let j = 0; j < s.length; j++) if (s[j] > 0) total += s[j] * Math.log(s[j] / p[j])
  return total
}

/** Calibration score: P(χ²_{B−1} ≥ 2 N I(s, p)), the upper tail of the likelihood-ratio statistic (Cooke 1991, ch. 12; Cooke & Goossens 2008). */
export function calibrationScore(counts: number[], p: number[]): { statistic: number; calibration: number } {
  const n = counts.reduce((a, b) => a + b, 0)
  const s = counts.map((c) => c / n)
  const statistic = 2 * n * relativeInformation(s, p)
  return { statistic, calibration: gammaPQ((p.length - 1) / 2, statistic / 2).q }
}

/** Bin index of a realisation among an expert's quantile values: r ≤ q goes to the lower bin. */
export function binOf(values: number[], r: number): number {
  let j = 0
  while (j < values.length && r > values[j]) j++
  return j
}

/** Intrinsic range [L, U] of one question (all experts' outer quantiles and the realisation), widened by the overshoot k on each side (Cooke 1991; Blischke & Murthy 2003, §15.3.2). */
export function intrinsicRange(assessments: number[][], realization: number | undefined, overshoot: number): { lower: number; upper: number } {
  let lo = Math.min(...assessments.map((a) => a[0]))
  let hi = Math.max(...assessments.map((a) => a[a.length - 1]))
  if (realization !== undefined) {
    lo = Math.min(lo, realization)
    hi = Math.max(hi, realization)
  }
  const pad = overshoot * (hi - lo)
  return { lower: lo - pad, upper: hi + pad }
}

/** Information of the minimum-information density (uniform between consecutive points of L*, q…, U*) relative to the uniform background on [L*, U*] (Cooke 1991, ch. 12). */
export function informationScore(values: number[], p: number[], lower: number, upper: number): number {
  const t = [lower, ...values, upper]
  let total = 0
  for (let j = 0; j < p.length; j++) if (p[j] > 0) total += p[j] * Math.log(p[j] / ((t[j + 1] - t[j]) / (upper - lower)))
  return total
}

function validate(input: CookeInput): void {
  const { quantiles, experts, realizations } = input
  if (!Array.isArray(quantiles) || quantiles.length === 0) throw new EngineInputError('quantiles', 'Give the probabilities of the elicited quantiles.')
  quantiles.forEach((q, i) => {
    if (!(q > 0 && q < 1)) throw new EngineInputError('quantiles', 'Quantile probabilities must lie strictly between 0 and 1.')
    if (i > 0 && !(q > quantiles[i - 1])) throw new EngineInputError('quantiles', 'Quantile probabilities must increase.')
  })
  if (!Array.isArray(realizations) || realizations.length === 0) throw new EngineInputError('realizations', 'At least one calibration question with a known value is required.')
  realizations.forEach((r) => {
    if (!Number.isFinite(r)) throw new EngineInputError('realizations', 'Every realisation must be a finite number.')
  })
  if (!Array.isArray(experts) || experts.length === 0) throw new EngineInputError('experts', 'At least one expert is required.')
  for (const e of experts) {
    if (!Array.isArray(e.assessments) || e.assessments.length !== realizations.length)
      throw new EngineInputError('experts', `${e.label}: one assessment per calibration question is required (${realizations.length}).`)
    e.assessments.forEach((a, qi) => {
      if (!Array.isArray(a) || a.length !== quantiles.length)
        throw new EngineInputError('experts', `${e.label}, question ${qi + 1}: give ${quantiles.length} quantile values.`)
      a.forEach((v, j) => {
        if (!Number.isFinite(v)) throw new EngineInputError('experts', `${e.label}, question ${qi + 1}: values must be finite.`)
        if (j > 0 && !(v > a[j - 1])) throw new EngineInputError('experts', `${e.label}, question ${qi + 1}: quantile values must increase.`)
      })
    })
  }
  const overshoot = input.overshoot ?? 0.1
  if (!(overshoot >= 0 && Number.isFinite(overshoot))) throw new EngineInputError('overshoot', 'The overshoot must be 0 or more.')
  const cutoff = input.cutoff ?? 0
  if (!(cutoff >= 0 && cutoff < 1)) throw new EngineInputError('cutoff', 'The calibration cutoff must lie in [0, 1).')
}

/**
 * Cooke's classical model (Cooke 1991, ch. 12; Cooke & Goossens 2008): calibration, mean information over the seed
 * questions and weight C × I × 1{C ≥ cutoff}, normalised over experts (all zero if no expert passes the cutoff).
 */
export function cookeClassical(input: CookeInput): CookeResult {
  validate(input)
  const { quantiles, experts, realizations } = input
  const overshoot = input.overshoot ?? 0.1
  const cutoff = input.cutoff ?? 0
  const p = binProbabilities(quantiles)
  const ranges = realizations.map((r, qi) =>
    intrinsicRange(
      experts.map((e) => e.assessments[qi]),
      r,
      overshoot,
    ),
  )
  const scored = experts.map((e) => {
    const counts = new Array<number>(p.length).fill(0)
    e.assessments.forEach((a, qi) => counts[binOf(a, realizations[qi])]++)
    const { statistic, calibration } = calibrationScore(counts, p)
    const informationByQuestion = e.assessments.map((a, qi) => informationScore(a, p, ranges[qi].lower, ranges[qi].upper))
    const information = informationByQuestion.reduce((s, v) => s + v, 0) / informationByQuestion.length
    const weight = calibration >= cutoff ? calibration * information : 0
    return { id: e.id, calibration, information, weight, normalizedWeight: 0, binCounts: counts, statistic, informationByQuestion }
  })
  const total = scored.reduce((s, e) => s + e.weight, 0)
  for (const e of scored) e.normalizedWeight = total > 0 ? e.weight / total : 0
  return { experts: scored, ranges }
}

/** The minimum-information distribution given quantiles on [lower, upper]: piecewise-uniform CDF through (L*, 0), (q_j, p_j), (U*, 1). */
export function minimumInformationDistribution(quantiles: number[], values: number[], lower: number, upper: number): Univariate {
  const xs = [lower, ...values, upper]
  const ps = [0, ...quantiles, 1]
  const cdf = (x: number): number => {
    if (x <= lower) return 0
    if (x >= upper) return 1
    let j = 0
    while (x > xs[j + 1]) j++
    return ps[j] + ((ps[j + 1] - ps[j]) * (x - xs[j])) / (xs[j + 1] - xs[j])
  }
  const pdf = (x: number): number => {
    if (x < lower || x > upper) return 0
    let j = 0
    while (j < xs.length - 2 && x > xs[j + 1]) j++
    return (ps[j + 1] - ps[j]) / (xs[j + 1] - xs[j])
  }
  const quantile = (p: number): number => {
    if (p <= 0) return lower
    if (p >= 1) return upper
    let j = 0
    while (p > ps[j + 1]) j++
    return xs[j] + ((xs[j + 1] - xs[j]) * (p - ps[j])) / (ps[j + 1] - ps[j])
  }
  let m = 0
  let m2 = 0
  for (let j = 0; j + 1 < xs.length; j++) {
    const w = ps[j + 1] - ps[j]
    const a = xs[j]
    const b = xs[j + 1]
    m += (w * (a + b)) / 2
    m2 += (w * (a * a + a * b + b * b)) / 3
  }
  return { pdf, cdf, quantile, mean: () => m, sd: () => Math.sqrt(Math.max(0, m2 - m * m)) }
}

/** Decision maker for one question: the linear pool of the experts' minimum-information distributions with the given weights (Cooke 1991, ch. 12). */
export function decisionMaker(quantiles: number[], assessments: number[][], weights: number[], range: { lower: number; upper: number }): Pool {
  return mixture(
    assessments.map((a) => minimumInformationDistribution(quantiles, a, range.lower, range.upper)),
    weights,
  )
}

/** One cutoff tried by optimisedCutoff: the experts it keeps and the decision maker's scores as a virtual expert. */
export type CutoffCandidate = { cutoff: number; expertIds: string[]; binCounts: number[]; calibration: number; information: number; score: number }

/**
 * Cooke's optimised decision maker (Cooke 1991, ch. 12; Cooke & Goossens 2008): for each cutoff α at one of the experts'
 * calibration scores (the weights change only there), the decision maker of every seed question is the weighted linear pool
 * of the kept experts' minimum-information distributions; its quantiles are scored like an expert's on the same questions
 * and intrinsic ranges, and the α with the largest calibration × information is chosen (on a tie the smaller α, which keeps
 * more experts). A score of exactly 1 is tried as the largest cutoff below 1, which keeps the same experts.
 */
export function optimisedCutoff(input: CookeInput): { best: CutoffCandidate; candidates: CutoffCandidate[] } {
  validate(input)
  const { quantiles, realizations } = input
  const p = binProbabilities(quantiles)
  const base = cookeClassical({ ...input, cutoff: 0 })
  const cutoffs = [...new Set(base.experts.map((e) => Math.min(e.calibration, 1 - Number.EPSILON / 2)))].sort((a, b) => a - b)
  const candidates = cutoffs.map((cutoff): CutoffCandidate => {
    const scored = cookeClassical({ ...input, cutoff })
    const weights = scored.experts.map((e) => e.normalizedWeight)
    const counts = new Array<number>(p.length).fill(0)
    let information = 0
    realizations.forEach((r, qi) => {
      const dm = decisionMaker(
        quantiles,
        input.experts.map((e) => e.assessments[qi]),
        weights,
        scored.ranges[qi],
      )
      const values = quantiles.map((q) => dm.quantile(q))
      counts[binOf(values, r)]++
      information += informationScore(values, p, scored.ranges[qi].lower, scored.ranges[qi].upper) / realizations.length
    })
    const { calibration } = calibrationScore(counts, p)
    return { cutoff, expertIds: scored.experts.filter((e) => e.weight > 0).map((e) => e.id), binCounts: counts, calibration, information, score: calibration * information }
  })
  const best = candidates.reduce((b, c) => (c.score > b.score ? c : b))
  return { best, candidates }
}
