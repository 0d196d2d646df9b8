import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { CHECKS, FIXTURE_PATH } from './checks'

// The fixture is a copy of the team's ../shared/checks.json (REFERENCE.md's machine-readable check cases).
const TEAM_COPY = resolve(process.cwd(), '../shared/checks.json')

describe('reference check fixture', () => {
  it.skipIf(!existsSync(TEAM_COPY))('matches the team copy beside the project', () => {
    expect(JSON.parse(readFileSync(FIXTURE_PATH, 'utf8'))).toEqual(JSON.parse(readFileSync(TEAM_COPY, 'utf8')))
  })

  it('every check case is exercised by a test in this folder', () => {
    const dir = dirname(dirname(FIXTURE_PATH))
    const text = readdirSync(dir)
      .filter((f) => f.endsWith('.test.ts') && f !== 'fixture.test.ts')
      .map((f) => readFileSync(resolve(dir, f), 'utf8'))
      .join('\n')
    const missing = CHECKS.map((c) => c.id).filter((id) => !text.includes(`'${id}'`))
    expect(missing).toEqual([])
    expect(CHECKS.length).toBe(44)
  })
})
