/**
 * What an expert's plausible bounds mean, in one place for the fit, the screens, the practice
 * question and the e-mails: the expert would be very surprised to learn that the true value lies
 * below the lower bound (or above the upper one). Priorsmith reads each bound as the point with
 * this much probability beyond it (the tool's own convention, documented in docs/methods/).
 */
export const PLAUSIBLE_BOUND_PROB = 0.01

/** The same convention in plain words, for experts. */
export const PLAUSIBLE_BOUND_WORDS = 'about 1 chance in 100'
