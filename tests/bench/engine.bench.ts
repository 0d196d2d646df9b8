// Speed benchmark of the statistics engine (not a test): `npm run bench`.
// Prints fitting times, a width sweep per data model, the fractional Bayes factor and power-scaling sensitivity, Cooke weights, and — where python3 with scipy is installed —
// the same least-squares fits done by scipy.optimize.least_squares for comparison.
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import {
  analyzePrior,
  cdf,
  cookeClassical,
  copulaCorrelationFromConditional,
  dirichletFromMarginals,
  nearestCorrelation,
  sampleJoint,
  familiesFor,
  fitAll,
  fitDistribution,
  fittingStarts,
  fractionalBayesFactor,
  POWER_SCALING_THRESHOLD,
  powerScalingSensitivity,
  quantile,
  widthSweep,
  type Family,
  type FitOptions,
  type PilotData,
  type Point,
  type PriorDistribution,
  type Support,
  type Distribution,
} from '../../shared/stats/index'
import { fitWithRange, type PlausibleRange } from '../../shared/elicitation/fits'
import { combine, fitCombination, leaveOneOut, resolveWeights, summarise, type Component } from '../../shared/elicitation/reconcile'
import { supportBounds } from '../../shared/stats/points'

function mulberry32(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

const rand = mulberry32(20240611)
const between = (lo: number, hi: number): number => lo + (hi - lo) * rand()
const PROBS = [0.05, 0.25, 0.5, 0.75, 0.95]

type Judgement = { points: Point[]; support: Support }

/** An expert's five quantiles: the quantiles of a random "true" distribution at jittered probabilities, reported at the nominal ones. */
function makeJudgement(): Judgement {
  const kind = Math.floor(rand() * 4)
  let support: Support
  let truth: PriorDistribution
  let shift = 0
  if (kind === 0) {
    support = { kind: 'real' }
    truth = { family: 'gamma', shape: between(2, 30), rate: between(0.1, 3) }
    shift = between(-40, 20)
  } else if (kind === 1) {
    support = { kind: 'positive' }
    truth = rand() < 0.5 ? { family: 'gamma', shape: between(1, 40), rate: between(0.05, 5) } : { family: 'lognormal', meanlog: between(-2, 4), sdlog: between(0.1, 1) }
  } else if (kind === 2) {
    support = { kind: 'proportion' }
    truth = { family: 'beta', alpha: between(1, 30), beta: between(1, 30) }
  } else {
    const lower = between(-10, 10)
    const upper = lower + between(5, 100)
    support = { kind: 'bounded', lower, upper }
    truth = { family: 'scaled-beta', alpha: between(1, 15), beta: between(1, 15), lower, upper }
  }
  const jittered = PROBS.map((p) => Math.min(0.99, Math.max(0.01, p + between(-0.03, 0.03)))).sort((a, b) => a - b)
  const values = jittered.map((p) => quantile(truth, p) + shift)
  for (let i = 1; i < values.length; i++) if (!(values[i] > values[i - 1])) values[i] = values[i - 1] + 1e-6 * Math.max(1, Math.abs(values[i - 1]))
  return { points: values.map((value, i) => ({ value, prob: PROBS[i] })), support }
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s[Math.floor(s.length / 2)]
}

const fmt = (ms: number): string => (ms < 1 ? `${(ms * 1000).toFixed(0)} µs` : ms < 1000 ? `${ms.toFixed(1)} ms` : `${(ms / 1000).toFixed(2)} s`)

const judgements = Array.from({ length: 1000 }, makeJudgement)

// Warm-up so that the JIT has compiled the hot paths before timing.
for (const j of judgements.slice(0, 100)) fitAll(j.points, j.support)

console.log('Priorsmith statistics engine benchmark')
console.log(`node ${process.version}`)
console.log('')

const perJudgement: number[] = []
const t0 = performance.now()
for (const j of judgements) {
  const s = performance.now()
  fitAll(j.points, j.support)
  perJudgement.push(performance.now() - s)
}
const totalAll = performance.now() - t0
console.log('Fitting (least squares on the CDF, 5 points, all families for the support, all starting points)')
console.log(`  median time to fit all families to one judgement: ${fmt(median(perJudgement))}`)
console.log(`  1,000 judgements: ${fmt(totalAll)}`)

// The same judgements with plausible bounds one quantile gap beyond the outer values (inside the support), fitted
// by the path answers take: the bounds as weighted 1 %/99 % points, then the default-fit rule.
const bounded = judgements.map((j) => {
  const x = j.points.map((p) => p.value)
  const edge = supportBounds(j.support)
  const range: PlausibleRange = { lower: Math.max(edge.lower, 2 * x[0] - x[1]), upper: Math.min(edge.upper, 2 * x[4] - x[3]), source: 'bounds' }
  return { ...j, range }
})
for (const j of bounded.slice(0, 100)) fitWithRange(j.points, j.support, j.range)
const perBounded: number[] = []
const tb = performance.now()
for (const j of bounded) {
  const s = performance.now()
  fitWithRange(j.points, j.support, j.range)
  perBounded.push(performance.now() - s)
}
const totalBounded = performance.now() - tb
console.log('Fitting with plausible bounds (5 quantiles + bounds as weighted 1 %/99 % points, default-fit rule and warnings)')
console.log(`  median time per judgement: ${fmt(median(perBounded))}`)
console.log(`  1,000 judgements: ${fmt(totalBounded)}`)
console.log('')

// Width sweeps: 50 factors from 0.25 to 8 (log-spaced) × 10 priors for each data model.
const factors = Array.from({ length: 50 }, (_, i) => 0.25 * 32 ** (i / 49))
const X = [2.2, 3.5, 2.8, 3.9, 2.6]
const sweeps: { label: string; data: PilotData; priors: PriorDistribution[]; support?: Support }[] = [
  {
    label: 'normal, known σ',
    data: { model: 'normal-known-sigma', sigma: 2, values: X },
    priors: [
      { family: 'normal', mu: 0, sigma: 5 },
      { family: 'normal', mu: 4, sigma: 1 },
      { family: 'normal', mu: 10, sigma: 2 },
      { family: 'normal', mu: 3, sigma: 0.5 },
      { family: 'uniform', lower: 0, upper: 10 },
      { family: 'uniform', lower: 1, upper: 6 },
      { family: 'student-t', mu: 0, sigma: 5, df: 3 },
      { family: 'student-t', mu: 5, sigma: 1, df: 5 },
      { family: 'lognormal', meanlog: 1, sdlog: 0.5 },
      { family: 'gamma', shape: 4, rate: 1 },
    ],
    support: { kind: 'positive' },
  },
  {
    label: 'normal, unknown σ (σ ~ half-normal(5))',
    data: { model: 'normal', values: X, sigmaPrior: { family: 'half-normal', scale: 5 } },
    priors: [
      { family: 'normal', mu: 0, sigma: 10 },
      { family: 'normal', mu: 4, sigma: 1 },
      { family: 'normal', mu: 10, sigma: 2 },
      { family: 'normal', mu: 3, sigma: 0.5 },
      { family: 'normal', mu: -2, sigma: 3 },
      { family: 'uniform', lower: 0, upper: 10 },
      { family: 'uniform', lower: 1, upper: 6 },
      { family: 'student-t', mu: 0, sigma: 5, df: 3 },
      { family: 'lognormal', meanlog: 1, sdlog: 0.5 },
      { family: 'gamma', shape: 4, rate: 1 },
    ],
    support: { kind: 'positive' },
  },
  {
    label: 'binomial (7 of 20)',
    data: { model: 'binomial', successes: 7, trials: 20 },
    priors: [
      { family: 'beta', alpha: 2, beta: 3 },
      { family: 'beta', alpha: 1, beta: 1 },
      { family: 'beta', alpha: 10, beta: 10 },
      { family: 'beta', alpha: 0.5, beta: 0.5 },
      { family: 'beta', alpha: 3, beta: 12 },
      { family: 'uniform', lower: 0, upper: 1 },
      { family: 'uniform', lower: 0.1, upper: 0.6 },
      { family: 'uniform', lower: 0, upper: 0.5 },
      { family: 'scaled-beta', alpha: 2, beta: 2, lower: 0.1, upper: 0.9 },
      { family: 'scaled-beta', alpha: 3, beta: 5, lower: 0, upper: 0.8 },
    ],
    support: { kind: 'proportion' },
  },
  {
    label: 'Poisson with exposure (5 counts)',
    data: { model: 'poisson', counts: [2, 4, 3, 0, 5], exposures: [1, 1.5, 1, 0.5, 2] },
    priors: [
      { family: 'gamma', shape: 2, rate: 0.5 },
      { family: 'gamma', shape: 1, rate: 1 },
      { family: 'gamma', shape: 10, rate: 4 },
      { family: 'gamma', shape: 0.5, rate: 0.1 },
      { family: 'gamma', shape: 30, rate: 5 },
      { family: 'lognormal', meanlog: 1.1, sdlog: 0.5 },
      { family: 'lognormal', meanlog: 0, sdlog: 1 },
      { family: 'lognormal', meanlog: 2, sdlog: 0.3 },
      { family: 'uniform', lower: 0, upper: 10 },
      { family: 'half-normal', scale: 5 },
    ],
    support: { kind: 'positive' },
  },
]
console.log('')
console.log('Width sweep: 50 factors (0.25–8) × 10 priors per data model')
for (const s of sweeps) {
  widthSweep(s.priors[0], s.data, [0.5, 1, 2], s.support)
  const start = performance.now()
  let flagged = 0
  for (const prior of s.priors) if (widthSweep(prior, s.data, factors, s.support).priorDriven) flagged++
  console.log(`  ${s.label.padEnd(42)} ${fmt(performance.now() - start).padStart(9)}   (${flagged} of 10 flagged prior-driven)`)
}

// Fractional Bayes factor (each prior against the first, default b) and power-scaling sensitivity for the same 10 priors
// per data model, timed apart for the conjugate priors (closed forms) and the others (quadrature).
console.log('')
console.log('Fractional Bayes factor + power-scaling sensitivity, 10 candidates per data model')
for (const s of sweeps) {
  powerScalingSensitivity(s.priors[0], s.data)
  const conjugate = (p: PriorDistribution): boolean =>
    (s.data.model === 'normal-known-sigma' && (p.family === 'normal' || p.family === 'uniform')) ||
    (s.data.model === 'binomial' && (p.family === 'beta' || ((p.family === 'uniform' || p.family === 'scaled-beta') && p.lower === 0 && p.upper === 1))) ||
    (s.data.model === 'poisson' && p.family === 'gamma')
  const times = { closed: 0, quadrature: 0, nClosed: 0, nQuadrature: 0 }
  let sensitive = 0
  const start = performance.now()
  for (const prior of s.priors) {
    const t0 = performance.now()
    fractionalBayesFactor(prior, s.priors[0], s.data)
    if (powerScalingSensitivity(prior, s.data).prior >= POWER_SCALING_THRESHOLD) sensitive++
    const kind = conjugate(prior) ? 'closed' : 'quadrature'
    times[kind] += performance.now() - t0
    times[kind === 'closed' ? 'nClosed' : 'nQuadrature']++
  }
  console.log(
    `  ${s.label.padEnd(42)} ${fmt(performance.now() - start).padStart(9)} for 10` +
    `   (closed form ${times.nClosed}: ${fmt(times.closed)}; quadrature ${times.nQuadrature}: ${fmt(times.quadrature)}; ${sensitive} prior-sensitive)`,
  )
}

// Cooke's classical model: 20 experts × 15 calibration questions.
const cookeRand = mulberry32(99)
const realizations = Array.from({ length: 15 }, () => 1 + 100 * cookeRand())
const experts = Array.from({ length: 20 }, (_, e) => ({
  id: `E${e + 1}`,
  label: `Expert ${e + 1}`,
  assessments: realizations.map((r) => {
    const centre = r * (0.6 + 0.8 * cookeRand())
    const spread = r * (0.05 + 0.6 * cookeRand())
    return [centre - 1.645 * spread, centre, centre + 1.645 * spread]
  }),
}))
const cookeInput = { quantiles: [0.05, 0.5, 0.95], experts, realizations, cutoff: 0 }
for (let i = 0; i < 50; i++) cookeClassical(cookeInput)
const cookeTimes: number[] = []
for (let i = 0; i < 500; i++) {
  const s = performance.now()
  cookeClassical(cookeInput)
  cookeTimes.push(performance.now() - s)
}
console.log('')
console.log(`Cooke's classical model, 20 experts × 15 questions: median ${fmt(median(cookeTimes))} per evaluation`)

// Joint priors: a Dirichlet from 10 elicited shares, the nearest correlation matrix of 20 × 20 expert links that do not
// hold together, and 10,000 joint draws of 10 quantities through a Gaussian copula.
const jointRand = mulberry32(7)
const shares: Distribution[] = Array.from({ length: 10 }, () => ({ family: 'beta', alpha: between(1, 20), beta: between(20, 120) }))
for (let i = 0; i < 20; i++) dirichletFromMarginals(shares)
const dirichletTimes: number[] = []
for (let i = 0; i < 200; i++) {
  const s = performance.now()
  dirichletFromMarginals(shares)
  dirichletTimes.push(performance.now() - s)
}
const links = Array.from({ length: 20 }, () => new Array<number>(20).fill(0))
for (let i = 0; i < 20; i++) {
  links[i][i] = 1
  for (let j = 0; j < i; j++) links[i][j] = links[j][i] = copulaCorrelationFromConditional(0.1 + 0.8 * jointRand())
}
const ncStart = performance.now()
const repaired = nearestCorrelation(links)
const ncTime = performance.now() - ncStart
const tenMarginals: Distribution[] = [
  ...shares.slice(0, 4),
  { family: 'gamma', shape: 4, rate: 0.5 },
  { family: 'lognormal', meanlog: 1.2, sdlog: 0.4 },
  { family: 'normal', mu: 10, sigma: 3 },
  { family: 'student-t', mu: 0, sigma: 1, df: 5 },
  { family: 'scaled-beta', alpha: 3, beta: 5, lower: 0, upper: 30 },
  { family: 'uniform', lower: 2, upper: 8 },
]
const tenR = nearestCorrelation(links.slice(0, 10).map((row) => row.slice(0, 10))).matrix
sampleJoint(tenMarginals, tenR, 500, 1)
const drawTimes = (n: number, repeats: number): number[] =>
  Array.from({ length: repeats }, (_, r) => {
    const s = performance.now()
    sampleJoint(tenMarginals, tenR, n, 20261203 + r)
    return performance.now() - s
  })
const tenThousandDraws = drawTimes(10_000, 5)
const hundredThousandDraws = drawTimes(100_000, 3)
console.log('')
console.log('Joint priors')
console.log(`  dirichletFromMarginals, 10 shares: median ${fmt(median(dirichletTimes))}`)
console.log(`  nearestCorrelation, 20 × 20 (smallest eigenvalue ${repaired.minEigenvalue.toFixed(3)}, ${repaired.iterations} iterations, largest change ${repaired.maxChange.toFixed(3)}): ${fmt(ncTime)}`)
console.log(`  sampleJoint, 10 quantities (beta, gamma, lognormal, normal, t, scaled beta, uniform marginals): 10,000 draws median ${fmt(median(tenThousandDraws))} (5 runs), 100,000 draws median ${fmt(median(hundredThousandDraws))} (3 runs)`)

// The reconciliation view with a logarithmic pool of mixed families (normalised numerically): the pool, its summary, the
// fit of every family and the leave-one-out pools. A first view makes every pool; a repeated view (the same answers
// and weights, as on every reload and on a save that changed something else) finds them made.
console.log('')
console.log('Reconciliation view, logarithmic pool of lognormal, gamma and normal experts (median of 7 views)')
for (const experts of [5, 10, 20]) {
  const priors = (shift: number): Component[] =>
    Array.from({ length: experts }, (_, i) => ({
      expertId: i + 1,
      label: `Expert ${i + 1}`,
      distribution: (i % 3 === 0
        ? { family: 'lognormal', meanlog: 2.3 + 0.05 * i + shift, sdlog: 0.3 + 0.01 * i }
        : i % 3 === 1 ? { family: 'gamma', shape: 8 + i, rate: 0.7 - shift } : { family: 'normal', mu: 11 + 0.3 * i + shift, sigma: 2 + 0.1 * i }) as Distribution,
    }))
  const weights = resolveWeights('equal', experts)
  const view = (components: Component[]): number => {
    const s = performance.now()
    const pooled = combine('logarithmic', components, weights)
    summarise(pooled)
    fitCombination(pooled, { kind: 'positive' })
    leaveOneOut('logarithmic', components, weights)
    return performance.now() - s
  }
  view(priors(-1e-3))
  const first = Array.from({ length: 7 }, (_, r) => view(priors(1e-4 * (r + 1))))
  const again = Array.from({ length: 7 }, () => view(priors(1e-4)))
  console.log(`  ${String(experts).padStart(2)} experts: first view ${fmt(median(first))}, repeated view ${fmt(median(again))}`)
}

// Huge counts and parameters: Box's p and the evidence at n up to 1e12 (the prior's CDF averaged over a beta or gamma,
// cost independent of n), and CDF + quantile at huge beta, gamma and t parameters (large-parameter expansions).
console.log('')
console.log('Huge counts: evidence + Box p (median of 5 runs per case)')
const hugeCases: [string, PriorDistribution, (n: number) => PilotData][] = [
  ['binomial, beta(2, 3) prior (closed form)', { family: 'beta', alpha: 2, beta: 3 }, (n) => ({ model: 'binomial', successes: Math.round(0.37 * n), trials: n })],
  ['binomial, uniform(0.1, 0.8) prior (quadrature)', { family: 'uniform', lower: 0.1, upper: 0.8 }, (n) => ({ model: 'binomial', successes: Math.round(0.37 * n), trials: n })],
  ['Poisson, gamma(2, 0.5) prior (closed form)', { family: 'gamma', shape: 2, rate: 0.5 }, (n) => ({ model: 'poisson', counts: [n], exposures: [Math.floor(n / 3)] })],
  ['Poisson, lognormal(1, 0.5) prior (quadrature)', { family: 'lognormal', meanlog: 1, sdlog: 0.5 }, (n) => ({ model: 'poisson', counts: [n], exposures: [Math.floor(n / 3)] })],
]
for (const [label, prior, dataFor] of hugeCases) {
  const cells = [1e6, 1e9, 2e10, 1e12].map((n) => {
    const times: number[] = []
    for (let i = 0; i < 5; i++) {
      const s = performance.now()
      analyzePrior(prior, dataFor(n))
      times.push(performance.now() - s)
    }
    return `n ${n.toExponential(0)}: ${fmt(median(times))}`
  })
  console.log(`  ${label.padEnd(48)} ${cells.join('   ')}`)
}
const hugeParameters: [string, PriorDistribution][] = [
  ['beta(1e12, 1e12)', { family: 'beta', alpha: 1e12, beta: 1e12 }],
  ['beta(2e9, 5e10)', { family: 'beta', alpha: 2e9, beta: 5e10 }],
  ['gamma shape 1e15', { family: 'gamma', shape: 1e15, rate: 1 }],
  ['Student t df 1e16', { family: 'student-t', mu: 0, sigma: 1, df: 1e16 }],
]
console.log('Huge parameters: quantile then CDF at 11 probabilities from 1e-300 to 1 − 1e-10 (median per pair)')
for (const [label, d] of hugeParameters) {
  const times: number[] = []
  for (const p of [1e-300, 1e-100, 1e-20, 1e-10, 1e-3, 0.3, 0.5, 0.7, 0.999, 1 - 1e-6, 1 - 1e-10]) {
    const s = performance.now()
    cdf(d, quantile(d, p))
    times.push(performance.now() - s)
  }
  console.log(`  ${label.padEnd(48)} ${fmt(median(times))}`)
}

// Comparison with scipy.optimize.least_squares (MINPACK Levenberg–Marquardt, xtol = ftol = gtol = 1e-15) on the same
// judgements, families and starting points. The uniform (a piecewise-linear CDF) is left out of the comparison.
type Pair = { j: number; family: Family; options: FitOptions; starts: number[][] }
const pairs: Pair[] = []
judgements.forEach((jd, j) => {
  for (const family of familiesFor(jd.support)) {
    if (family === 'uniform') continue
    const options: FitOptions = family === 'scaled-beta' && jd.support.kind === 'bounded' ? { lower: jd.support.lower, upper: jd.support.upper } : family === 'student-t' ? { df: 3 } : {}
    pairs.push({ j, family, options, starts: fittingStarts(jd.points, family, options) })
  }
})
const engineSse: number[] = []
const engineStart = performance.now()
for (const p of pairs) engineSse.push(fitDistribution(judgements[p.j].points, p.family, p.options).sse)
const engineTime = performance.now() - engineStart

const PY = String.raw`
import json, sys, time, math
import numpy as np
np.seterr(all='ignore')
from scipy.optimize import least_squares
from scipy.special import ndtr, stdtr, gammainc, betainc
data = json.load(open(sys.argv[1]))
def residuals(family, x, p, opt):
    if family == 'normal':
        return lambda t: ndtr((x - t[0]) / np.exp(t[1])) - p
    if family == 'student-t':
        df = opt.get('df', 3)
        return lambda t: stdtr(df, (x - t[0]) / np.exp(t[1])) - p
    if family == 'lognormal':
        lx = np.log(x)
        return lambda t: ndtr((lx - t[0]) / np.exp(t[1])) - p
    if family == 'gamma':
        return lambda t: gammainc(np.exp(t[0]), np.exp(t[1]) * x) - p
    if family == 'beta':
        return lambda t: betainc(np.exp(t[0]), np.exp(t[1]), x) - p
    if family == 'scaled-beta':
        y = (x - opt['lower']) / (opt['upper'] - opt['lower'])
        return lambda t: betainc(np.exp(t[0]), np.exp(t[1]), y) - p
    raise ValueError(family)
jobs = []
for pair in data['pairs']:
    jd = data['judgements'][pair['j']]
    x = np.array([q['value'] for q in jd['points']])
    p = np.array([q['prob'] for q in jd['points']])
    jobs.append((residuals(pair['family'], x, p, pair['options']), pair['starts']))
for f, starts in jobs[:50]:
    least_squares(f, starts[0], method='lm', xtol=1e-15, ftol=1e-15, gtol=1e-15)
out = []
t0 = time.perf_counter()
for f, starts in jobs:
    best = math.inf
    for s in starts:
        try:
            r = least_squares(f, s, method='lm', xtol=1e-15, ftol=1e-15, gtol=1e-15)
            best = min(best, 2 * r.cost)
        except (ValueError, OverflowError, FloatingPointError):
            pass
    out.append(best)
elapsed = time.perf_counter() - t0
print(json.dumps({'seconds': elapsed, 'sse': out}))
`

function runScipy(): { seconds: number; sse: number[]; version: string } | string {
  const probe = spawnSync('python3', ['-c', 'import scipy, numpy; print(scipy.__version__)'], { encoding: 'utf8' })
  if (probe.error || probe.status !== 0) return 'python3 with scipy is not available'
  const dir = mkdtempSync(join(tmpdir(), 'priorsmith-bench-'))
  try {
    const file = join(dir, 'judgements.json')
    writeFileSync(file, JSON.stringify({ judgements, pairs }))
    const run = spawnSync('python3', ['-c', PY, file], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 })
    if (run.error || run.status !== 0) return `the scipy run failed: ${(run.stderr || String(run.error)).trim().split('\n').pop()}`
    return { ...(JSON.parse(run.stdout) as { seconds: number; sse: number[] }), version: probe.stdout.trim() }
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

console.log('')
console.log(`Same fits as scipy.optimize.least_squares would do: ${pairs.length} (judgement, family) pairs, ${pairs.reduce((s, p) => s + p.starts.length, 0)} starting points`)
console.log(`  engine: ${fmt(engineTime)}`)
const scipy = runScipy()
if (typeof scipy === 'string') {
  console.log(`  scipy: skipped (${scipy})`)
} else {
  console.log(`  scipy ${scipy.version} least_squares (method 'lm', tolerances 1e-15): ${fmt(scipy.seconds * 1000)}`)
  console.log(`  engine is ${((scipy.seconds * 1000) / engineTime).toFixed(1)}× faster`)
  let worse = 0
  let better = 0
  let worst = 0
  scipy.sse.forEach((s, i) => {
    const e = engineSse[i]
    const excess = (e - s) / Math.max(s, 1e-300)
    if (e > s * (1 + 1e-6) + 1e-15) {
      worse++
      worst = Math.max(worst, excess)
    } else if (e < s * (1 - 1e-6) - 1e-15) better++
  })
  console.log(`  SSE no worse than scipy's (relative 1e-6): ${pairs.length - worse} of ${pairs.length} pairs` + (worse ? `; worst excess ${worst.toExponential(2)}` : ''))
  console.log(`  SSE lower than scipy's by more than 1e-6 relative: ${better} pairs`)
}
