import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { oldLabelsIn } from '../support/old-labels'

/**
 * The built client (dist/, made before the browser suites run) holds none of the labels Priorsmith gave up; the
 * record's JSON and .docx are checked the same way in tests/api/record-review.test.ts.
 */
const dist = join(__dirname, '../../dist')

function filesUnder(folder: string): string[] {
  return readdirSync(folder).flatMap((name) => {
    const path = join(folder, name)
    return statSync(path).isDirectory() ? filesUnder(path) : /\.(js|css|html)$/.test(name) ? [path] : []
  })
}

describe('the built client', () => {
  it('contains none of the old labels', () => {
    const files = filesUnder(dist)
    expect(files.some((f) => f.endsWith('.js'))).toBe(true)
    const found = files.flatMap((f) => oldLabelsIn(readFileSync(f, 'utf8')).map((hit) => `${f.slice(dist.length + 1)}: ${hit}`))
    expect(found).toEqual([])
  })
})
