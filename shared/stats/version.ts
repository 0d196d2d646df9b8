/**
 * Version of the statistical engine. Raised whenever a value it computes for the same inputs changes (1.1.0: the
 * binomial evidence of row data keeps the per-row binomial coefficients), so a record and a cached analysis say which
 * engine produced their numbers.
 */
export const ENGINE_VERSION = '1.1.0'
