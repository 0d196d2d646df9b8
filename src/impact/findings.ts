import { formatNumber, formatPercent, withUnit } from '@shared/format'
import type { ImpactResult } from '@/api/impact'
import { bfText } from './format'

/**
 * Sentences the browser adds before the server's findings: where the posterior lands under the
 * reconciled prior, how far the candidates disagree, the Bayes factor in words, and the decisions.
 */
export function extraFindings(result: ImpactResult, unit: string, symbol: string): string[] {
  const out: string[] = []
  const rec = result.candidates.find((c) => c.kind === 'reconciled')
  if (rec) {
    out.push(
      `Under the reconciled prior the posterior mean of ${symbol} is ${withUnit(formatNumber(rec.posterior.mean), unit)} ` +
      `(95 % interval ${formatNumber(rec.posterior.q025)} to ${formatNumber(rec.posterior.q975)}); the prior alone said ${formatNumber(rec.priorSummary.mean)} ` +
      `(${formatNumber(rec.priorSummary.q025)} to ${formatNumber(rec.priorSummary.q975)}).`,
    )
    if (rec.bayesFactor) {
      const favours = rec.bayesFactor.logBF >= 0 ? 'favour the reconciled prior over the comparison prior' : 'favour the comparison prior over the reconciled prior'
      out.push(`The pilot data ${favours} by a Bayes factor of ${bfText(Math.abs(rec.bayesFactor.logBF))} (${rec.bayesFactor.label}); read it with the width sweep below.`)
    }
  } else {
    out.push('No reconciled prior is saved for this quantity yet, so there is no width sweep or tipping point; reconcile the experts’ judgements first.')
  }
  const others = result.candidates.filter((c) => c.kind !== 'comparison')
  if (others.length > 1) {
    const means = others.map((c) => c.posterior.mean)
    out.push(`Across the ${others.length} candidate priors other than the comparison prior the posterior mean ranges from ${formatNumber(Math.min(...means))} to ${withUnit(formatNumber(Math.max(...means)), unit)}.`)
  }
  if (result.decision) {
    const decided = result.candidates.filter((c) => c.decision)
    const acting = decided.filter((c) => c.decision!.act).length
    out.push(
      acting === decided.length ? `All ${decided.length} candidate priors lead to acting under the decision rule.`
        : acting === 0 ? `None of the ${decided.length} candidate priors leads to acting under the decision rule.`
          : `${acting} of ${decided.length} candidate priors lead to acting under the decision rule; the choice of prior decides it.`,
    )
    if (result.tipping) out.push(`Under the reconciled prior the probability in the rule is ${formatPercent(result.tipping.probabilityNow)}, so the decision is to ${result.tipping.actNow ? 'act' : 'not act'}.`)
  }
  return out
}
