import { cdf, fitAll, quantile, type Point } from '../../shared/stats/index'

/** Feedback on the practice question: the best fit to the expert's values and where the known answer fell. */
export function practiceFeedback(points: Point[], trueValue: number) {
  const support = points[0].value > 0 && trueValue > 0 ? ({ kind: 'positive' } as const) : ({ kind: 'real' } as const)
  const [best] = fitAll(points, support)
  const truthProb = cdf(best.distribution, trueValue)
  return {
    distribution: best.distribution,
    sse: best.sse,
    q05: quantile(best.distribution, 0.05),
    q50: quantile(best.distribution, 0.5),
    q95: quantile(best.distribution, 0.95),
    trueValue,
    /** Share of the expert's probability below the true value (0.5 = the truth sat at their median). */
    truthProb,
    insideQuartiles: truthProb >= 0.25 && truthProb <= 0.75,
    inside90: truthProb >= 0.05 && truthProb <= 0.95,
  }
}
