import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { CHECKS, FIXTURE_PATH } from './checks'

// checks.json is written by generate_checks.py beside it (mpmath at 40 digits, scipy cross-checks); both are committed,
// and CI reads the JSON without running Python.
describe('reference check fixture', () => {
  const fixture = JSON.parse(readFileSync(FIXTURE_PATH, 'utf8'))

  it('comes with its generator and records the reference library versions it was generated with', () => {
    const generator = resolve(dirname(FIXTURE_PATH), 'generate_checks.py')
    expect(existsSync(generator)).toBe(true)
    expect(fixture.meta.description).toContain('generate_checks.py')
    expect(fixture.meta.generated_with).toEqual([
      expect.stringMatching(/^scipy \d+\.\d+\.\d+ \/ numpy \d+\.\d+\.\d+$/),
      expect.stringMatching(/^mpmath \d+\.\d+\.\d+ at 40 significant digits$/),
      expect.stringMatching(/^Python \d+\.\d+(\.\d+)?$/),
    ])
    const source = readFileSync(generator, 'utf8')
    for (const c of CHECKS) expect(source, `generator writes ${c.id}`).toContain(`'${c.id}'`)
  })

  it('names a source for every case', () => {
    for (const c of CHECKS) expect(c.source.length, c.id).toBeGreaterThan(20)
  })

  it('every check case is exercised by a test in this folder', () => {
    const dir = dirname(dirname(FIXTURE_PATH))
    const text = readdirSync(dir)
      .filter((f) => f.endsWith('.test.ts') && f !== 'fixture.test.ts')
      .map((f) => readFileSync(resolve(dir, f), 'utf8'))
      .join('\n')
    const missing = CHECKS.map((c) => c.id).filter((id) => !text.includes(`'${id}'`))
    expect(missing).toEqual([])
    expect(CHECKS.length).toBe(45)
  })
})
