import { dirichletFromMarginals, dirichletMarginal, EngineInputError, mean, type DirichletFit, type Distribution } from '../stats/index'
import { dirichletModelCode, readDirichletCode } from './joint-model-code'
import { MODEL_LANGUAGES, safeName, type ModelLanguage } from './model-code'

/** One share of a composition as reconciled so far: its final prior, or null while it waits for reconciliation. */
export interface CompositionShareInput {
  quantityId: number
  name: string
  symbol: string
  prior: Distribution | null
}

/** A share of the fitted Dirichlet beside its reconciled marginal; the "other" share has no quantity and no marginal of its own. */
export interface CompositionPriorShare {
  quantityId: number | null
  name: string
  symbol: string | null
  /** The share's reconciled prior (null for the "other" share, or while it waits). */
  prior: Distribution | null
  /** Mean of the reconciled prior, before the shares are scaled to add up to 1. */
  elicitedMean: number | null
  alpha: number | null
  /** The Dirichlet's beta marginal for this share. */
  marginal: Distribution | null
  /** Largest |F_Dirichlet(q) − p| at the share's own 5/25/50/75/95 % quantiles (probability scale); null for the "other" share. */
  mismatch: number | null
  /** Concentration the share's own mean and variance imply: m(1 − m)/v − 1. */
  impliedConcentration: number | null
}

export interface CompositionModelLine {
  language: ModelLanguage
  code: string
  /** Priorsmith's reader takes the concentrations back out of the line; ok when they match within 1e-9 relative. */
  check: { ok: boolean; maxRelativeDifference: number }
}

export interface CompositionPrior {
  /** The model's name for the simplex of shares, from the composition's name. */
  symbol: string
  shares: CompositionPriorShare[]
  /** Shares not reconciled yet: the Dirichlet waits for them. */
  waitingFor: string[]
  fit: DirichletFit | null
  /** Why no Dirichlet could be fitted to reconciled shares (the engine's message), else null. */
  problem: string | null
  modelCode: CompositionModelLine[]
}

/** The model name of a composition's simplex: its name in lower case with every other character as _, never empty. */
export function compositionSymbol(name: string): string {
  const s = name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '')
  return safeName(s || 'shares')
}

/** The lines of every language for a Dirichlet, each with a comment naming the shares in order, and the read-back check. */
export function compositionModelCode(alpha: number[], symbol: string, shareNames: string[]): CompositionModelLine[] {
  return MODEL_LANGUAGES.map((language) => {
    const line = dirichletModelCode(alpha, symbol, language)
    const back = readDirichletCode(line, language)
    const maxRelativeDifference = back.length === alpha.length ? Math.max(...alpha.map((a, i) => Math.abs(back[i] - a) / a)) : Infinity
    const comment = language === 'stan' ? '//' : '#'
    return {
      language,
      code: `${comment} ${symbol}: shares in order: ${shareNames.join(', ')}\n${line}`,
      check: { ok: maxRelativeDifference <= 1e-9, maxRelativeDifference },
    }
  })
}

/**
 * A composition's joint prior once every share is reconciled: the Dirichlet of dirichletFromMarginals fitted to the
 * reconciled marginals (with the "other" share taking the rest when there is one), each share beside its reconciled
 * prior, and the model code. Before that, which shares it waits for.
 */
export function compositionPrior(name: string, shares: CompositionShareInput[], residualLabel: string | null): CompositionPrior {
  const symbol = compositionSymbol(name)
  const waitingFor = shares.filter((s) => s.prior === null).map((s) => s.name)
  const rows: CompositionPriorShare[] = shares.map((s) => ({
    quantityId: s.quantityId, name: s.name, symbol: s.symbol, prior: s.prior, elicitedMean: s.prior ? mean(s.prior) : null,
    alpha: null, marginal: null, mismatch: null, impliedConcentration: null,
  }))
  const residualRow: CompositionPriorShare | null = residualLabel === null ? null
    : { quantityId: null, name: residualLabel, symbol: null, prior: null, elicitedMean: null, alpha: null, marginal: null, mismatch: null, impliedConcentration: null }
  const all = residualRow ? [...rows, residualRow] : rows
  if (waitingFor.length) return { symbol, shares: all, waitingFor, fit: null, problem: null, modelCode: [] }
  let fit: DirichletFit
  try {
    fit = dirichletFromMarginals(shares.map((s) => s.prior as Distribution), { residual: residualRow !== null })
  } catch (error) {
    if (error instanceof EngineInputError) return { symbol, shares: all, waitingFor, fit: null, problem: error.message, modelCode: [] }
    throw error
  }
  all.forEach((row, i) => {
    row.alpha = fit.alpha[i]
    row.marginal = dirichletMarginal(fit.alpha, i)
    row.mismatch = fit.mismatch[i] ?? null
    row.impliedConcentration = fit.impliedConcentration[i] ?? null
  })
  return { symbol, shares: all, waitingFor, fit, problem: null, modelCode: compositionModelCode(fit.alpha, symbol, all.map((r) => r.symbol ?? r.name)) }
}
