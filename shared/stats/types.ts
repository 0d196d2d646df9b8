/** A fitted or analyst-specified distribution. Student-t `sigma` is the scale, not the sd; gamma uses the rate. */
export type Distribution =
  | { family: 'normal'; mu: number; sigma: number }
  | { family: 'student-t'; mu: number; sigma: number; df: number }
  | { family: 'lognormal'; meanlog: number; sdlog: number }
  | { family: 'gamma'; shape: number; rate: number }
  | { family: 'beta'; alpha: number; beta: number }
  | { family: 'scaled-beta'; alpha: number; beta: number; lower: number; upper: number }
  | { family: 'uniform'; lower: number; upper: number }

export type Family = Distribution['family']

/** Half-normal on (0, ∞) with density 2φ(x/scale)/scale; used as a prior on a standard deviation, never fitted. */
export type HalfNormal = { family: 'half-normal'; scale: number }

/** Any distribution the engine can evaluate: the fitted families plus the half-normal. */
export type PriorDistribution = Distribution | HalfNormal

/** One elicited point: P(X ≤ value) = prob. */
export type Point = { value: number; prob: number }

export type Support =
  | { kind: 'real' }
  | { kind: 'positive' }
  | { kind: 'proportion' }
  | { kind: 'bounded'; lower: number; upper: number }

export type FitResult = { distribution: Distribution; sse: number }

/** A distribution given by its functions (a pool, a posterior, a piecewise-uniform Cooke distribution). */
export interface Univariate {
  pdf(x: number): number
  cdf(x: number): number
  quantile(p: number): number
  mean(): number
  sd(): number
}

export interface Pool extends Univariate {
  kind: 'linear-pool' | 'log-pool'
  components: readonly Univariate[]
  weights: readonly number[]
}

export type PilotData =
  | { model: 'normal-known-sigma'; sigma: number; values: number[] }
  | { model: 'normal'; values: number[]; sigmaPrior: PriorDistribution }
  | {
    model: 'binomial'
    successes: number
    trials: number
    /** The rows as recorded (a 0/1 column has trials of 1); the evidence then keeps the per-row binomial coefficients. */
    rows?: { successes: number[]; trials: number[] }
  }
  | { model: 'poisson'; counts: number[]; exposures: number[] }

export type PosteriorSummary = { mean: number; sd: number; q025: number; q50: number; q975: number }

export type Analysis = {
  logEvidence: number
  method: 'closed-form' | 'quadrature'
  posterior: PosteriorSummary
  priorPredictiveP: number
  /** ln of Box's p: finite when p itself underflows to 0 under a strong prior–data conflict. */
  logPriorPredictiveP: number
  /** Box's p is below CONFLICT_LEVEL (5 %): the data sit in the tail of what the prior predicts. */
  conflict: boolean
  priorEss: number | null
}

export type CookeInput = {
  quantiles: number[]
  /** `id` ties each score to the caller's expert; `label` names the expert in messages, as the user knows them. */
  experts: { id: string; label: string; assessments: number[][] }[]
  realizations: number[]
  overshoot?: number
  cutoff?: number
}

export type CookeExpertScore = {
  id: string
  calibration: number
  information: number
  weight: number
  normalizedWeight: number
  binCounts: number[]
  statistic: number
  informationByQuestion: number[]
}

export type CookeResult = {
  experts: CookeExpertScore[]
  ranges: { lower: number; upper: number }[]
}

export type BayesFactorResult = {
  logBF: number
  twoLnBF: number
  log10BF: number
  label: string
  category: string
  favours: 'A' | 'B'
  jeffreys: string
}

export type SweepPoint = {
  factor: number
  prior: PriorDistribution
  logEvidence: number
  posteriorMean: number
  q025: number
  q975: number
}

export type SweepResult = { points: SweepPoint[]; evidenceRatio: number; priorDriven: boolean }

/** A Dirichlet on the shares of a whole (shares sum to one); αᵢ > 0. */
export type DirichletPrior = { family: 'dirichlet'; alpha: number[] }

/** Multinomial pilot data: rows of category counts as recorded (one row per observed group, or one-hot rows of 1). */
export type MultinomialData = { model: 'multinomial'; counts: number[][] }

export type DirichletFit = DirichletPrior & {
  /** Per elicited share: largest |F_Dirichlet(q) − p| at the share's own 5/25/50/75/95 % quantiles q (probability scale). */
  mismatch: number[]
  totalConcentration: number
  /** Σ of the elicited shares' means (before scaling to 1). */
  meanSum: number
  /** Per elicited share: the concentration m(1 − m)/v − 1 its mean and variance imply on their own. */
  impliedConcentration: number[]
  warnings: { code: 'mean-sum' | 'unequal-certainty'; message: string }[]
}

export type DirichletAnalysis = {
  logEvidence: number
  method: 'closed-form'
  posteriorAlpha: number[]
  /** Per category: the posterior's beta marginal. */
  posterior: PosteriorSummary[]
  priorEss: number
  observations: number
}

export type DirichletSweepPoint = { factor: number; alpha: number[]; logEvidence: number; posteriorMeans: number[] }

export type NearestCorrelation = {
  matrix: number[][]
  maxChange: number
  /** matrix − input, entry by entry. */
  changes: number[][]
  /** The input's smallest eigenvalue (negative when it was not a correlation matrix). */
  minEigenvalue: number
  iterations: number
}
