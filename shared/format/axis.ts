/** A step of 1, 2 or 5 times a power of ten close to `range / count` (common practice for axis ticks). */
export function niceStep(range: number, count = 3): number {
  const raw = range / count
  const power = 10 ** Math.floor(Math.log10(raw))
  const m = raw / power
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * power
}

/** A multiple of `step` without the binary-float tail (0.30000000000000004 → 0.3). */
const onStep = (k: number, step: number) => Number((k * step).toPrecision(12))

/**
 * Round axis ends around [lo, hi]: outward to multiples of a 1-2-5 step giving about `count` intervals (common
 * practice for axis ticks), then clipped to the quantity's possible values [floor, ceiling]. [1.8, 28.7] → 0 to 30 by 5.
 */
export function niceAxis(lo: number, hi: number, count = 6, floor = -Infinity, ceiling = Infinity): { min: number; max: number; step: number } {
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || !(hi > lo)) {
    const centre = Number.isFinite(lo) ? lo : Number.isFinite(hi) ? hi : 0
    return niceAxis(centre - 0.5, centre + 0.5, count, floor, ceiling)
  }
  const step = niceStep(hi - lo, count)
  const min = Math.max(floor, onStep(Math.floor(lo / step + 1e-9), step))
  const max = Math.min(ceiling, onStep(Math.ceil(hi / step - 1e-9), step))
  return { min, max, step }
}

/** The tick values of a round axis: every step from min to max, without binary-float tails. */
export function axisTicks(axis: { min: number; max: number; step: number }): number[] {
  const out: number[] = []
  for (let k = 0; axis.min + k * axis.step <= axis.max + axis.step * 1e-9; k++) out.push(Number((axis.min + k * axis.step).toPrecision(12)))
  return out
}
