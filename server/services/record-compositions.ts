import type { RecordComposition, RecordCompositionImpact } from '../../shared/api/records'
import type { CompositionImpact } from '../../shared/elicitation/composition-impact'
import { compositionPrior, type CompositionPrior } from '../../shared/elicitation/composition-prior'
import type { Distribution } from '../../shared/stats/index'
import type { Db } from '../db/knex'
import { listCompositions } from './compositions'

/** The shares of a composition that keep it out of the prior, in words; null when it is part of the prior. */
function whyNotInPrior(prior: CompositionPrior, leftOutShares: string[]): string | null {
  if (leftOutShares.length) return `Not part of the prior: ${leftOutShares.join(', ')} ${leftOutShares.length === 1 ? 'is' : 'are'} left out of this record.`
  if (prior.waitingFor.length) return `Not part of the prior: still to reconcile: ${prior.waitingFor.join(', ')}.`
  if (!prior.fit) return `Not part of the prior: no Dirichlet could be fitted to the reconciled shares (${prior.problem}).`
  return null
}

const sameAlpha = (a: number[], b: number[]) => a.length === b.length && a.every((x, i) => x === b[i])

/** An analysis as the record keeps it: what it found, never when or by whom it was run (the content hash stays stable). */
function recordImpact(r: CompositionImpact, dataset: Record<string, any>): RecordCompositionImpact {
  return {
    dataset: { name: dataset.name, version: dataset.version, rows: dataset.row_count, summary: dataset.summary, sha256: dataset.sha256 },
    observations: r.observations,
    prior: {
      label: r.prior.label, alpha: r.prior.alpha, logEvidence: r.prior.analysis.logEvidence, priorEss: r.prior.analysis.priorEss,
      posteriorAlpha: r.prior.analysis.posteriorAlpha,
      posterior: r.prior.analysis.posterior.map((s) => ({ mean: s.mean, sd: s.sd, q025: s.q025, q975: s.q975 })),
    },
    comparison: { label: r.comparison.label, alpha: r.comparison.alpha, logEvidence: r.comparison.analysis.logEvidence },
    bayesFactor: { logBF: r.bayesFactor.logBF, twoLnBF: r.bayesFactor.twoLnBF, label: r.bayesFactor.category, favours: r.bayesFactor.favours === 'A' ? 'prior' : 'comparison' },
    sweep: {
      evidenceRatio: r.sweep.evidenceRatio, priorDriven: r.sweep.priorDriven,
      points: r.sweep.points.map((p) => ({ factor: p.factor, totalConcentration: p.totalConcentration, logEvidence: p.logEvidence, logBFvsComparison: p.logBFvsComparison })),
    },
    flags: r.flags,
    findings: r.findings,
  }
}

/**
 * The study's compositions as the record states them. A composition is part of the prior when every share has a final
 * prior (reconciled, not left out of the record) and the Dirichlet could be fitted; its impact is the newest analysis run
 * on that very Dirichlet (same α), never one run before a share was reconciled again.
 */
export async function recordCompositions(db: Db, studyId: number, finals: Map<number, Distribution>, leftOut: Set<number>): Promise<RecordComposition[]> {
  const compositions = await listCompositions(db, studyId)
  if (compositions.length === 0) return []
  const ids = compositions.map((c) => c.id)
  const analyses = await db('composition_analyses as a').join('composition_datasets as d', 'd.id', 'a.dataset_id').whereIn('a.composition_id', ids)
    .orderBy('a.id', 'desc').select('a.composition_id', 'a.result', 'd.name', 'd.version', 'd.row_count', 'd.summary', 'd.sha256')
  return compositions.map((c): RecordComposition => {
    const shares = c.shares.map((s) => ({ quantityId: s.quantityId, name: s.name, symbol: s.symbol, prior: finals.get(s.quantityId) ?? null }))
    const prior = compositionPrior(c.name, shares, c.residual ? c.residualLabel : null)
    const reason = whyNotInPrior(prior, c.shares.filter((s) => leftOut.has(s.quantityId)).map((s) => s.name))
    const fit = reason === null ? prior.fit : null
    const analysis = fit ? analyses.find((a) => a.composition_id === c.id && sameAlpha((a.result as CompositionImpact).prior.alpha, fit.alpha)) : undefined
    return {
      name: c.name,
      wording: c.wording,
      symbol: prior.symbol,
      residual: c.residual,
      shares: prior.shares.map((s) => ({
        name: s.name, symbol: s.symbol, prior: s.prior, elicitedMean: s.elicitedMean,
        alpha: fit ? s.alpha : null, dirichletMean: fit && s.alpha !== null ? s.alpha / fit.totalConcentration : null,
        marginal: fit ? s.marginal : null, mismatch: fit ? s.mismatch : null, impliedConcentration: fit ? s.impliedConcentration : null,
      })),
      inPrior: fit !== null,
      notInPriorReason: reason,
      dirichlet: fit ? { alpha: fit.alpha, totalConcentration: fit.totalConcentration, meanSum: fit.meanSum, warnings: fit.warnings } : null,
      modelCode: fit ? prior.modelCode : [],
      impact: analysis ? recordImpact(analysis.result as CompositionImpact, analysis) : null,
    }
  })
}
