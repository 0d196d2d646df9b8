// Loads the reference check cases (fixtures/checks.json, written by fixtures/generate_checks.py) and shared assertions.
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { expect } from 'vitest'

export type CheckCase = {
  id: string
  section: string
  method: string
  inputs: Record<string, any>
  expected: Record<string, any>
  tolerance: Record<string, any>
  source: string
}

export const FIXTURE_PATH = fileURLToPath(new URL('./fixtures/checks.json', import.meta.url))

const parsed = JSON.parse(readFileSync(FIXTURE_PATH, 'utf8')) as { checks: CheckCase[] }

export const CHECKS: readonly CheckCase[] = parsed.checks

export function check(id: string): CheckCase {
  const c = CHECKS.find((x) => x.id === id)
  if (!c) throw new Error(`No check case ${id} in the fixture`)
  return c
}

/** |actual − expected| ≤ tol·|expected| (absolute tol when expected is 0). */
export function expectRel(actual: number, expected: number, tol: number, label = ''): void {
  const scale = expected === 0 ? 1 : Math.abs(expected)
  const err = Math.abs(actual - expected) / scale
  expect(err, `${label} actual ${actual} expected ${expected} (relative error ${err.toExponential(2)} > ${tol})`).toBeLessThanOrEqual(tol)
}

export function expectAbs(actual: number, expected: number, tol: number, label = ''): void {
  const err = Math.abs(actual - expected)
  expect(err, `${label} actual ${actual} expected ${expected} (absolute error ${err.toExponential(2)} > ${tol})`).toBeLessThanOrEqual(tol)
}

/** Largest relative difference over pairs (absolute where the reference is 0). */
export function maxRelDiff(pairs: [number, number][]): number {
  return pairs.reduce((m, [a, b]) => Math.max(m, b === 0 ? Math.abs(a) : Math.abs(a - b) / Math.abs(b)), 0)
}
