import type { PracticeFeedback } from '../../shared/api/rounds'
import { cdf, fitAll, quantile, type Point } from '../../shared/stats/index'

/** The expert's own value at a probability when they gave one, else the fitted distribution's. */
function answeredOr(points: Point[], prob: number, fitted: () => number): number {
  return points.find((p) => Math.abs(p.prob - prob) < 1e-9)?.value ?? fitted()
}

/**
 * Feedback on the practice question: the best fit to the expert's values and where the known answer fell, judged
 * against the expert's own plausible bounds (their lowest and highest values) and quartiles.
 */
export function practiceFeedback(points: Point[], trueValue: number): PracticeFeedback {
  const support = points[0].value > 0 && trueValue > 0 ? ({ kind: 'positive' } as const) : ({ kind: 'real' } as const)
  const [best] = fitAll(points, support)
  const truthProb = cdf(best.distribution, trueValue)
  const lower = points[0].value
  const upper = points[points.length - 1].value
  const q1 = answeredOr(points, 0.25, () => quantile(best.distribution, 0.25))
  const q3 = answeredOr(points, 0.75, () => quantile(best.distribution, 0.75))
  return {
    distribution: best.distribution,
    sse: best.sse,
    lower,
    q50: answeredOr(points, 0.5, () => quantile(best.distribution, 0.5)),
    upper,
    trueValue,
    truthProb,
    insideQuartiles: trueValue >= q1 && trueValue <= q3,
    insideBounds: trueValue >= lower && trueValue <= upper,
  }
}
