import { describe, expect, it } from 'vitest'
import { compositionPrior, compositionSymbol } from '../../../shared/elicitation/composition-prior'
import { dirichletFromMarginals } from '../../../shared/stats/index'

/** Constructed shares of Kestrel Valley households; the Dirichlet itself is checked against scipy in tests/unit/stats/joint.test.ts. */
const share = (quantityId: number, symbol: string, alpha: number, beta: number) => ({ quantityId, name: `Share ${symbol}`, symbol, prior: { family: 'beta' as const, alpha, beta } })

describe('compositionPrior', () => {
  it('names the simplex after the composition, in model-safe characters', () => {
    expect(compositionSymbol('Household uptake (2027)')).toBe('household_uptake_2027')
    expect(compositionSymbol('2027 uptake')).toBe('q_2027_uptake')
    expect(compositionSymbol('—')).toBe('shares')
  })

  it('with an "other" share, gives it the rest of the mean and no marginal of its own to compare', () => {
    const shares = [share(1, 'join', 12, 28), share(2, 'meter', 8, 32)]
    const r = compositionPrior('Uptake', shares, 'Undecided')
    const engine = dirichletFromMarginals(shares.map((s) => s.prior), { residual: true })
    expect(r.fit?.alpha).toEqual(engine.alpha)
    expect(r.shares.map((s) => [s.name, s.quantityId, s.alpha])).toEqual([['Share join', 1, engine.alpha[0]], ['Share meter', 2, engine.alpha[1]], ['Undecided', null, engine.alpha[2]]])
    expect(r.shares[2]).toMatchObject({ prior: null, elicitedMean: null, mismatch: null, impliedConcentration: null })
    expect(r.shares[2].marginal).toEqual({ family: 'beta', alpha: engine.alpha[2], beta: engine.alpha[0] + engine.alpha[1] })
    expect(r.modelCode.map((m) => m.code.split('\n')[0])).toEqual([
      '// uptake: shares in order: join, meter, Undecided', '# uptake: shares in order: join, meter, Undecided', '# uptake: shares in order: join, meter, Undecided', '# uptake: shares in order: join, meter, Undecided',
    ])
    expect(r.modelCode.every((m) => m.check.ok && m.check.maxRelativeDifference <= 1e-9)).toBe(true)
  })

  it('reports the engine’s reason instead of a Dirichlet when the reconciled shares cannot make one', () => {
    // Shares whose means leave nothing for the "other" share.
    const r = compositionPrior('Uptake', [share(1, 'join', 60, 40), share(2, 'meter', 50, 50)], 'Other')
    expect(r.fit).toBeNull()
    expect(r.problem).toBe(`The shares' means add up to 1.10, which leaves nothing for the "other" share.`)
    expect(r.modelCode).toEqual([])
  })

  it('waits while a share has no reconciled prior', () => {
    const r = compositionPrior('Uptake', [share(1, 'join', 12, 28), { ...share(2, 'meter', 8, 32), prior: null }], null)
    expect(r).toMatchObject({ fit: null, problem: null, waitingFor: ['Share meter'] })
  })
})
