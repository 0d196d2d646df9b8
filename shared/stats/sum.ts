/** Decimal places of a number as JavaScript writes it at its shortest (1.1 → 1, 2.5e-7 → 8, 300 → 0). */
function decimalPlaces(x: number): number {
  const [mantissa, exponent] = String(Math.abs(x)).split('e')
  const fraction = mantissa.split('.')[1]?.length ?? 0
  return Math.max(0, fraction - Number(exponent ?? 0))
}

/**
 * Sum of numbers read from decimal text (CSV cells), exact to their decimals: a compensated (Neumaier 1974) sum rounded
 * to the most decimal places among the terms, so 1.10 + 0.85 + … + 0.80 is 8 rather than 7.999999999999999 (binary
 * floating point holds most decimal fractions only approximately). Terms with more than 15 decimals are summed as they are.
 */
export function decimalSum(values: readonly number[]): number {
  let sum = 0
  let compensation = 0
  let places = 0
  for (const v of values) {
    const t = sum + v
    compensation += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum
    sum = t
    places = Math.max(places, decimalPlaces(v))
  }
  const total = sum + compensation
  return places <= 15 && Number.isFinite(total) ? Number(total.toFixed(places)) : total
}
