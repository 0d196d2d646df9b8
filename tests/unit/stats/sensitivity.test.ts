import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import {
  analyzePrior, diagnose, EngineInputError, fractionalBayesFactor, fractionalBayesFactors, powerScaledPosterior, powerScalingSensitivity, priorPowerCurve,
  type CandidatePrior, type PilotData, type PosteriorSummary,
} from '@shared/stats'
import { expectRel } from './checks'

// Reference values: fixtures/sensitivity.json, written by fixtures/generate_sensitivity.py (scipy.integrate.quad on the
// same integrals, closed forms through scipy.special / scipy.stats, and an independent Python implementation of the
// power-scaling sensitivity of Kallioinen, Paananen, Bürkner & Vehtari 2023, Statistics and Computing 34:57, §3.2–3.3).
const FIXTURE = JSON.parse(readFileSync(fileURLToPath(new URL('./fixtures/sensitivity.json', import.meta.url)), 'utf8')) as {
  meta: { description: string; generated_with: string[] }
  fbf: { id: string; data: PilotData; prior1: CandidatePrior; prior2: CandidatePrior; b: number | null; expected: { b: number; logBF: number; closedLogQ1?: number } }[]
  posteriors: { id: string; data: PilotData; prior: CandidatePrior; alpha: number; target: 'prior' | 'likelihood'; expected: PosteriorSummary & { q05: number; q95: number }; closedForm?: PosteriorSummary }[]
  sensitivity: { id: string; data: PilotData; prior: CandidatePrior; expected: { prior: number; likelihood: number } }[]
}

const MODELS = ['normal-known-sigma', 'normal', 'binomial', 'poisson']

describe('sensitivity fixture', () => {
  it('records the library versions and covers every data model and the mixture for each tool', () => {
    expect(FIXTURE.meta.description).toContain('generate_sensitivity.py')
    expect(FIXTURE.meta.generated_with[0]).toMatch(/^scipy \d+\.\d+\.\d+ \/ numpy \d+\.\d+\.\d+$/)
    for (const list of [FIXTURE.fbf, FIXTURE.posteriors, FIXTURE.sensitivity]) {
      const cases = list as { data: PilotData; prior?: CandidatePrior; prior1?: CandidatePrior }[]
      expect(new Set(cases.map((c) => c.data.model))).toEqual(new Set(MODELS))
      expect(cases.some((c) => (c.prior ?? c.prior1)!.family === 'mixture')).toBe(true)
    }
  })
})

describe("fractional Bayes factor (O'Hagan 1995, JRSS B 57:99–138, §3) against scipy quad", () => {
  for (const c of FIXTURE.fbf) {
    it(`${c.id}: the Bayes factor to 1e-6 relative, closed form and quadrature alike`, () => {
      for (const forceQuadrature of [false, true]) {
        const r = fractionalBayesFactor(c.prior1, c.prior2, c.data, c.b ?? undefined, { forceQuadrature })
        expect(r.b).toBeCloseTo(c.expected.b, 14)
        expectRel(Math.exp(r.logBF), Math.exp(c.expected.logBF), 1e-6, `${c.id} quadrature=${forceQuadrature}`)
      }
    })
  }

  it('several priors against one reference give each pair’s value, the reference against itself 1', () => {
    for (const c of FIXTURE.fbf) {
      const [one, self] = fractionalBayesFactors([c.prior1, c.prior2], c.prior2, c.data, c.b ?? undefined)
      expectRel(Math.exp(one.logBF), Math.exp(c.expected.logBF), 1e-6, c.id)
      expect(one.b).toBeCloseTo(c.expected.b, 14)
      expect(self.logBF).toBe(0)
    }
  })

  it('default b is m₀/n: 1/n for the one-parameter models, 2/n for the normal with σ unknown', () => {
    const nks = FIXTURE.fbf.find((c) => c.id === 'fbf-normal-known-sigma')!
    expect(fractionalBayesFactor(nks.prior1, nks.prior2, nks.data).b).toBeCloseTo(1 / 6, 15)
    const normal = FIXTURE.fbf.find((c) => c.id === 'fbf-normal')!
    expect(fractionalBayesFactor(normal.prior1, normal.prior2, normal.data).b).toBeCloseTo(2 / 6, 15)
  })

  // Constructed case (common practice: a uniform prior much wider than the likelihood divides the marginal likelihood
  // by its width, while the fraction m/m_b does not depend on it).
  it('making a wide uniform prior 4× wider changes the fractional Bayes factor by under 1 % and the ordinary one by about 4', () => {
    const data: PilotData = { model: 'normal-known-sigma', sigma: 2, values: [3.1, 4.2, 2.7, 5.0, 3.8, 4.4] }
    const informed = { family: 'normal' as const, mu: 3, sigma: 1.5 }
    const wide = { family: 'uniform' as const, lower: -50, upper: 50 }
    const wider = { family: 'uniform' as const, lower: -200, upper: 200 }
    const ordinary = (p: CandidatePrior) => Math.exp(analyzePrior(informed, data).logEvidence - analyzePrior(p as typeof wide, data).logEvidence)
    const ratio = ordinary(wider) / ordinary(wide)
    expect(ratio).toBeGreaterThan(3.9)
    expect(ratio).toBeLessThan(4.1)
    const fbf = (p: CandidatePrior) => Math.exp(fractionalBayesFactor(informed, p, data).logBF)
    expect(Math.abs(fbf(wider) / fbf(wide) - 1)).toBeLessThan(0.01)
  })
})

function expectSummary(actual: PosteriorSummary, expected: PosteriorSummary, tol: number, label: string): void {
  for (const k of ['mean', 'sd', 'q025', 'q50', 'q975'] as const) {
    const scale = Math.max(Math.abs(expected[k]), expected.sd)
    expect(Math.abs(actual[k] - expected[k]) / scale, `${label} ${k}`).toBeLessThan(tol)
  }
}

describe('power-scaled posterior (Kallioinen et al. 2023, §3.1) against scipy', () => {
  for (const c of FIXTURE.posteriors) {
    it(`${c.id}: α = ${c.alpha} on the ${c.target}, mean, sd and quantiles to 1e-6`, () => {
      for (const forceQuadrature of [false, true]) {
        const r = powerScaledPosterior(c.prior, c.data, c.alpha, c.target, { forceQuadrature })
        expectSummary(r, c.expected, 1e-6, `${c.id} quadrature=${forceQuadrature}`)
        if (c.closedForm) expectSummary(r, c.closedForm, 1e-6, `${c.id} closed form`)
      }
    })
  }

  it('the α-curve gives the mean and the 5 % and 95 % points of the posterior with the prior raised to α', () => {
    const cases = FIXTURE.posteriors.filter((c) => c.target === 'prior')
    expect(new Set(cases.map((c) => c.data.model))).toEqual(new Set(MODELS))
    for (const c of cases) {
      const [point] = priorPowerCurve(c.prior, c.data, [c.alpha])
      expect(point.alpha).toBe(c.alpha)
      for (const k of ['mean', 'q05', 'q95'] as const) {
        expect(Math.abs(point[k] - c.expected[k]) / Math.max(Math.abs(c.expected[k]), c.expected.sd), `${c.id} ${k}`).toBeLessThan(1e-6)
      }
    }
  })

  it('α = 1 on either side is the ordinary posterior', () => {
    const c = FIXTURE.posteriors.find((x) => x.id === 'ps-nks-t-prior')!
    const base = analyzePrior(c.prior as never, c.data).posterior
    expectSummary(powerScaledPosterior(c.prior, c.data, 1, 'prior'), base, 1e-9, 'prior')
    expectSummary(powerScaledPosterior(c.prior, c.data, 1, 'likelihood'), base, 1e-9, 'likelihood')
  })
})

describe('power-scaling sensitivity against an independent implementation of the paper’s formula', () => {
  for (const c of FIXTURE.sensitivity) {
    it(`${c.id}: prior and likelihood sensitivity to 1e-4 relative`, () => {
      const r = powerScalingSensitivity(c.prior, c.data)
      expectRel(r.prior, c.expected.prior, 1e-4, `${c.id} prior`)
      expectRel(r.likelihood, c.expected.likelihood, 1e-4, `${c.id} likelihood`)
      expect(r.diagnosis).toBe(diagnose(c.expected.prior, c.expected.likelihood))
    })
  }

  it('reads the pair at the paper’s threshold 0.05 (§4)', () => {
    expect(diagnose(0.06, 0.06)).toBe('prior-data-conflict')
    expect(diagnose(0.06, 0.049)).toBe('weak-likelihood')
    expect(diagnose(0.01, 0.05)).toBe('likelihood-dominated')
    expect(diagnose(0.049, 0.01)).toBe('none')
  })

  // Consistency check of the engine against itself: by quadrature the base and the four scaled posteriors come from one set of
  // panels (the base posterior's); where the prior is conjugate each scaled posterior also has its own closed form, and the
  // two routes agree.
  it.each<[string, CandidatePrior, PilotData]>([
    ['normal prior, σ known', { family: 'normal', mu: 3, sigma: 1.5 }, { model: 'normal-known-sigma', sigma: 2, values: [3.1, 4.2, 2.7, 5.0, 3.8, 4.4] }],
    ['narrow normal prior against the data', { family: 'normal', mu: 9, sigma: 0.4 }, { model: 'normal-known-sigma', sigma: 1, values: [3.1, 4.2, 2.7] }],
    ['uniform prior, σ known', { family: 'uniform', lower: 0, upper: 6 }, { model: 'normal-known-sigma', sigma: 2, values: [3.1, 4.2, 2.7, 5.0] }],
    ['beta prior, binomial', { family: 'beta', alpha: 2, beta: 3 }, { model: 'binomial', successes: 7, trials: 20 }],
    ['gamma prior, Poisson', { family: 'gamma', shape: 3, rate: 1.5 }, { model: 'poisson', counts: [4, 7], exposures: [2, 3.5] }],
  ])('%s: the sensitivities from one quadrature equal the closed forms to 1e-6', (_, prior, data) => {
    const closed = powerScalingSensitivity(prior, data)
    const quadrature = powerScalingSensitivity(prior, data, { forceQuadrature: true })
    expectRel(quadrature.prior, closed.prior, 1e-6, 'prior')
    expectRel(quadrature.likelihood, closed.likelihood, 1e-6, 'likelihood')
  })

  // Constructed: a uniform prior raised to a power is the same uniform, so the posterior cannot move.
  it('a uniform prior has no prior sensitivity', () => {
    const data: PilotData = { model: 'binomial', successes: 4, trials: 20 }
    expect(powerScalingSensitivity({ family: 'uniform', lower: 0, upper: 1 }, data).prior).toBeLessThan(1e-9)
  })
})

describe('bad powers and training fractions', () => {
  const data: PilotData = { model: 'binomial', successes: 4, trials: 20 }
  const p = { family: 'beta' as const, alpha: 2, beta: 3 }
  const field = (run: () => unknown): string => {
    try {
      run()
    } catch (err) {
      expect(err).toBeInstanceOf(EngineInputError)
      return (err as EngineInputError).field
    }
    throw new Error('did not throw')
  }
  it.each([0, -1, Infinity, NaN, 1, 1.5])('b = %s is refused with field b', (b) => {
    expect(field(() => fractionalBayesFactor(p, p, data, b))).toBe('b')
  })
  it.each([0, -0.5, Infinity, -Infinity, NaN])('α = %s is refused with field alpha', (a) => {
    expect(field(() => powerScaledPosterior(p, data, a))).toBe('alpha')
    expect(field(() => powerScaledPosterior(p, data, a, 'likelihood'))).toBe('alpha')
  })
  it('the default b needs more observations than m₀', () => {
    expect(field(() => fractionalBayesFactor(p, p, { model: 'poisson', counts: [4], exposures: [2] }))).toBe('b')
    expect(fractionalBayesFactor(p, p, data, 0.3).logBF).toBe(0)
  })
  it('the α-curve refuses a bad power and an empty list with field alpha', () => {
    expect(field(() => priorPowerCurve(p, data, [1, 0]))).toBe('alpha')
    expect(field(() => priorPowerCurve(p, data, [NaN]))).toBe('alpha')
    expect(field(() => priorPowerCurve(p, data, []))).toBe('alpha')
  })
  it('an unknown target is refused', () => {
    expect(field(() => powerScaledPosterior(p, data, 2, 'both' as never))).toBe('target')
  })
})
