import { boolean, mixed, object, type AnyObject, type AnyObjectSchema, type NumberSchema, type TestContext } from 'yup'
import { impactSchema } from '@shared/schemas/impact'
import type { DecisionRule } from '@shared/elicitation/impact'
import { decimalSum, EngineInputError, familiesFor, supportBounds, supportOf, validateDistribution, type Distribution, type Family, type PilotData, type Support } from '@shared/stats'
import { FAMILY_PARAMS } from '@shared/format'
import type { ImpactRequest } from '@/api/impact'

/** A distribution as typed in the form: the family and its parameters (text while typing). */
export type DistributionValues = { family: Family } & Record<string, number | string | undefined>

export interface ImpactFormValues {
  datasetId: number | undefined
  comparison: DistributionValues
  mixtureOn: boolean
  mixtureWeight: number | string | undefined
  wide: DistributionValues
  decisionOn: boolean
  decision: { direction: 'above' | 'below'; threshold: number | string | undefined; probability: number | string | undefined }
  /** Training fraction b of the fractional Bayes factors as typed; empty: the default m₀/n. */
  trainingFraction: number | string | undefined
}

/** Families the comparison prior (and the mixture's wide component) may take for the quantity's support. */
export const priorFamilies = (support: Support): Family[] => familiesFor(support)

/** Two significant digits: defaults that read as chosen by a person (10, 0.05, 120). */
function round2(x: number): number {
  if (!Number.isFinite(x) || x === 0) return x
  return Number(x.toPrecision(2))
}

/** Centre and spread of the pilot data on the quantity's scale, to size default priors. */
export function dataScale(data: PilotData | undefined): { centre: number; spread: number } {
  if (!data) return { centre: 1, spread: 1 }
  switch (data.model) {
    case 'normal-known-sigma':
    case 'normal': {
      const n = data.values.length
      const mean = data.values.reduce((s, v) => s + v, 0) / Math.max(1, n)
      const sd = n > 1 ? Math.sqrt(data.values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1)) : 0
      const sigma = data.model === 'normal-known-sigma' ? data.sigma : sd
      return { centre: mean, spread: Math.max(sigma, sd, Math.abs(mean) / 2, 1e-9) }
    }
    case 'binomial':
      return { centre: data.successes / data.trials, spread: 0.5 }
    case 'poisson': {
      const y = data.counts.reduce((s, c) => s + c, 0)
      const t = decimalSum(data.exposures)
      const rate = y > 0 ? y / t : 1 / t
      return { centre: rate, spread: rate }
    }
  }
}

/**
 * A wide prior of the family, valid for the support, around the pilot data's scale: the analyst's
 * starting point for a comparison prior (or the mixture's wide component), to be edited.
 */
export function widePrior(family: Family, support: Support, data?: PilotData): Distribution {
  const { centre, spread } = dataScale(data)
  const { lower: lo, upper: hi } = supportBounds(support)
  const positiveCentre = centre > 0 ? centre : Math.max(spread, 1)
  switch (family) {
    case 'normal':
      return { family, mu: round2(centre), sigma: round2(10 * spread) }
    case 'student-t':
      return { family, mu: round2(centre), sigma: round2(10 * spread), df: 3 }
    case 'lognormal':
      return { family, meanlog: round2(Math.log(positiveCentre)), sdlog: 2 }
    case 'gamma':
      // Exponential with a mean ten times the data's scale.
      return { family, shape: 1, rate: round2(1 / (10 * positiveCentre)) }
    case 'beta':
      return { family, alpha: 1, beta: 1 }
    case 'scaled-beta':
      return { family, alpha: 1, beta: 1, lower: Number.isFinite(lo) ? lo : 0, upper: Number.isFinite(hi) ? hi : 1 }
    case 'uniform': {
      if (Number.isFinite(lo) && Number.isFinite(hi)) return { family, lower: lo, upper: hi }
      if (Number.isFinite(lo)) return { family, lower: lo, upper: round2(lo + 20 * positiveCentre) }
      return { family, lower: round2(centre - 20 * spread), upper: round2(centre + 20 * spread) }
    }
  }
}

/** The default comparison prior: the first family of the support, drawn wide. */
export function defaultComparison(support: Support, data?: PilotData): Distribution {
  const first = support.kind === 'positive' ? 'gamma' : priorFamilies(support)[0]
  return widePrior(first, support, data)
}

const isBlank = (v: unknown): boolean => v === undefined || v === null || (typeof v === 'string' && v.trim() === '')
const toNumber = (v: unknown): number => (typeof v === 'number' ? v : typeof v === 'string' && v.trim() !== '' ? Number(v.trim()) : NaN)

/** The typed values as a distribution (numbers parsed); null when the family is missing. */
export function toDistribution(values: DistributionValues | undefined): Distribution | null {
  if (!values?.family || !(values.family in FAMILY_PARAMS)) return null
  const d: Record<string, unknown> = { family: values.family }
  for (const p of FAMILY_PARAMS[values.family]) d[p.key] = toNumber(values[p.key])
  return d as unknown as Distribution
}

/** The form's values for a distribution (for the inputs). */
export function toValues(d: Distribution): DistributionValues {
  return { ...(d as unknown as DistributionValues) }
}

/**
 * First problem of a typed distribution, on the parameter it concerns: a missing or non-numeric value,
 * a parameter that must be positive, bounds in the wrong order, or mass outside the quantity's support.
 */
export function distributionProblem(values: DistributionValues | undefined, support: Support): { param: string; message: string } | null {
  if (!values?.family) return { param: 'family', message: 'Choose a family' }
  if (!priorFamilies(support).includes(values.family)) return { param: 'family', message: 'This family does not fit the quantity’s possible values' }
  for (const p of FAMILY_PARAMS[values.family]) {
    const raw = values[p.key]
    if (raw === undefined || raw === null || (typeof raw === 'string' && raw.trim() === '')) return { param: p.key, message: `Enter the ${p.label.toLowerCase()}` }
    const v = toNumber(raw)
    if (!Number.isFinite(v)) return { param: p.key, message: `The ${p.label.toLowerCase()} must be a number` }
    if (p.positive && !(v > 0)) return { param: p.key, message: `The ${p.label.toLowerCase()} must be above 0` }
  }
  const d = toDistribution(values)!
  if ((d.family === 'uniform' || d.family === 'scaled-beta') && !(d.lower < d.upper)) return { param: 'upper', message: 'The upper bound must be above the lower bound' }
  const { lower: lo, upper: hi } = supportBounds(support)
  const own = supportOf(d)
  if (own.lower < lo) return { param: d.family === 'uniform' || d.family === 'scaled-beta' ? 'lower' : 'family', message: `The prior must not go below ${lo}, the quantity’s lowest possible value` }
  if (own.upper > hi) return { param: d.family === 'uniform' || d.family === 'scaled-beta' ? 'upper' : 'family', message: `The prior must not go above ${hi}, the quantity’s highest possible value` }
  try {
    validateDistribution(d)
  } catch (err) {
    if (err instanceof EngineInputError) return { param: 'family', message: err.message }
    throw err
  }
  return null
}

function distributionSchema(support: Support) {
  return mixed<DistributionValues>().test('distribution', 'Check the distribution', function (this: TestContext<AnyObject>, value) {
    const problem = distributionProblem(value, support)
    return problem ? this.createError({ path: `${this.path}.${problem.param}`, message: problem.message }) : true
  })
}

/**
 * The impact form's schema: the shared impactSchema's rules for the dataset, the mixture weight and the
 * decision rule, and the distributions checked against the quantity's support. Nothing is stripped:
 * vee-validate casts the initial values with the schema, and options switched off keep their values
 * for when they are switched on again (requestOf leaves them out).
 */
export function impactFormSchema(support: Support) {
  const shared = impactSchema.fields
  const weight = shared.mixtureWeight as NumberSchema<number | null | undefined>
  const rule = shared.decision as AnyObjectSchema
  const fraction = shared.trainingFraction as NumberSchema<number | null | undefined>
  return object({
    datasetId: shared.datasetId,
    comparison: distributionSchema(support),
    mixtureOn: boolean().default(false),
    mixtureWeight: mixed().when('mixtureOn', {
      is: true,
      then: () => weight.nonNullable('Enter the weight on the wide component').required('Enter the weight on the wide component'),
      otherwise: (s) => s,
    }),
    wide: mixed().when('mixtureOn', { is: true, then: () => distributionSchema(support), otherwise: (s) => s }),
    decisionOn: boolean().default(false),
    decision: mixed().when('decisionOn', { is: true, then: () => rule.nonNullable().required(), otherwise: (s) => s }),
    // An empty field means the default b = m₀/n.
    trainingFraction: fraction.transform((v: unknown, typed: unknown) => (isBlank(typed) ? null : v)),
  })
}

/** Form values → the POST body (validated values expected). */
export function requestOf(values: ImpactFormValues): ImpactRequest {
  const decision: DecisionRule | null = values.decisionOn
    ? { direction: values.decision.direction, threshold: toNumber(values.decision.threshold), probability: toNumber(values.decision.probability) }
    : null
  return {
    datasetId: Number(values.datasetId),
    comparison: toDistribution(values.comparison)!,
    mixtureWeight: values.mixtureOn ? toNumber(values.mixtureWeight) : null,
    mixtureWide: values.mixtureOn ? toDistribution(values.wide) : null,
    decision,
    trainingFraction: isBlank(values.trainingFraction) ? null : toNumber(values.trainingFraction),
  }
}

/** Initial form values: the last run's inputs when there is one, else a wide comparison prior and no options. */
export function initialValues(support: Support, datasetId: number | undefined, data: PilotData | undefined, last?: ImpactRequest | null): ImpactFormValues {
  const comparison = last?.comparison ?? defaultComparison(support, data)
  return {
    datasetId: last?.datasetId ?? datasetId,
    comparison: toValues(comparison),
    mixtureOn: !!last?.mixtureWeight,
    mixtureWeight: last?.mixtureWeight ?? 0.2,
    wide: toValues(last?.mixtureWide ?? comparison),
    decisionOn: !!last?.decision,
    decision: last?.decision
      ? { ...last.decision }
      : { direction: 'above', threshold: undefined, probability: 0.8 },
    trainingFraction: last?.trainingFraction ?? '',
  }
}

/** "act if P(burst_rate > 12) > 0.8". */
export function ruleText(rule: DecisionRule, symbol: string, unit?: string): string {
  return `act if P(${symbol} ${rule.direction === 'above' ? '>' : '<'} ${rule.threshold}${unit ? ` ${unit}` : ''}) > ${rule.probability}`
}
