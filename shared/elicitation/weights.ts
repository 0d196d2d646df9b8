/**
 * Fewest calibration (seed) questions for performance weights to be taken at face value: about ten is the classical
 * model's common practice (Aspinall et al. 2016, PLoS One 11(3):e0149817, used ten to fifteen per panel; Cooke &
 * Goossens 2008, Reliab. Eng. Syst. Saf. 93:657–674).
 */
export const MIN_SEED_QUESTIONS = 10

/**
 * Fewest experts for performance weights to mean more than picking one or two people (the tool's own convention:
 * with two or three experts the optimised weights usually fall on a single expert).
 */
export const MIN_WEIGHTED_EXPERTS = 4

/** Plain cautions when performance weights rest on fewer calibration questions or experts than the minimums above. */
export function performanceWeightCautions(questionCount: number, expertCount: number): string[] {
  const out: string[] = []
  if (questionCount < MIN_SEED_QUESTIONS) {
    out.push(
      `Performance weights here rest on ${questionCount} calibration question${questionCount === 1 ? '' : 's'}; common practice asks for at least ${MIN_SEED_QUESTIONS}. ` +
        'With so few, one more question could change the weights a lot: compare the result with equal weights before relying on it.',
    )
  }
  if (expertCount < MIN_WEIGHTED_EXPERTS) {
    out.push(
      `Performance weights here compare ${expertCount} expert${expertCount === 1 ? '' : 's'}; this tool asks for at least ${MIN_WEIGHTED_EXPERTS} before the weights say much. ` +
        'With so few, the weights mostly pick one person: compare the result with equal weights before relying on it.',
    )
  }
  return out
}
