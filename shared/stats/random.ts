/**
 * A seeded uniform generator on (0, 1): Mulberry32 (T. Ettinger, public-domain 32-bit generator; common practice for
 * reproducible simulation where cryptographic quality is not needed). Two draws are combined for 53 random bits.
 */
export function seededUniform(seed: number): () => number {
  let a = Math.trunc(seed) >>> 0
  const next32 = (): number => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return (t ^ (t >>> 14)) >>> 0
  }
  return () => {
    const hi = next32() >>> 5 // 27 bits
    const lo = next32() >>> 6 // 26 bits
    return (hi * 67108864 + lo + 0.5) / 9007199254740992
  }
}
