export type {
  Analysis,
  BayesFactorResult,
  CookeExpertScore,
  CookeInput,
  CookeResult,
  DirichletAnalysis,
  DirichletFit,
  DirichletPrior,
  DirichletSweepPoint,
  Distribution,
  Family,
  FitResult,
  HalfNormal,
  MultinomialData,
  NearestCorrelation,
  PilotData,
  Point,
  Pool,
  PosteriorSummary,
  PriorDistribution,
  Support,
  SweepPoint,
  SweepResult,
  Univariate,
} from './types'
export { EngineInputError } from './errors'
export { cdf, logCdfSf, logPdf, mean, median, pdf, quantile, sd, sf, supportOf, toUnivariate, validateDistribution } from './distributions'
export {
  DEFAULT_T_DF,
  familiesFor,
  fitAll,
  fitDistribution,
  fittingStarts,
  lognormalFromQuantiles,
  normalFromQuantiles,
  studentTFromQuantiles,
  sumSquaredError,
  type FitOptions,
} from './fit'
export { pointsFromChips, pointsFromIntervals, supportBounds, validatePoints } from './points'
export { linearPool, logPool, mixture, mixtureQuantile, poolSummary } from './pool'
export { cookeClassical, decisionMaker, minimumInformationDistribution, optimisedCutoff, type CutoffCandidate } from './cooke'
export {
  analyzePrior,
  boxCheckNormalNormal,
  CONFLICT_LEVEL,
  normalInverseGamma,
  posteriorOf,
  type Posterior,
  priorEffectiveSampleSize,
  truncatedNormal,
  type AnalyzeOptions,
} from './evidence'
export { bayesFactor, JEFFREYS_SCALE, KASS_RAFTERY_SCALE } from './bayes-factor'
export { PRIOR_DRIVEN_CONVENTION, PRIOR_DRIVEN_RULE, scaleSpread, widthSweep } from './sweep'
export {
  CJS_DRAWS,
  cumulativeJsDistance,
  defaultTrainingFraction,
  diagnose,
  DIAGNOSIS_WORDS,
  fractionalBayesFactor,
  fractionalBayesFactors,
  minimalTrainingSize,
  observationCount,
  POWER_SCALING_STEP,
  POWER_SCALING_THRESHOLD,
  powerScaledPosterior,
  powerScalingSensitivity,
  priorPowerCurve,
  type CandidatePrior,
  type FractionalBayesFactor,
  type PowerScaledPoint,
  type PowerScalingSensitivity,
  type PriorMixture,
  type SensitivityDiagnosis,
} from './sensitivity'
export { ENGINE_VERSION } from './version'
export { decimalSum } from './sum'
export { COMPOSITION_CONVENTION, dirichletFromMarginals, dirichletMarginal, dirichletMultinomialAnalysis, dirichletWidthSweep } from './dirichlet'
export {
  conditionalFromCopulaCorrelation,
  copulaCorrelationFromConditional,
  correlationWithEigenvalueFloor,
  nearestCorrelation,
  poolCorrelations,
  rankCorrelationOfCopula,
  sampleJoint,
} from './copula'
