import { readdirSync, readFileSync } from 'node:fs'
import path from 'node:path'
import { describe, expect, it } from 'vitest'

const ROOT = path.resolve(import.meta.dirname, '../..')
const METHODS = path.join(ROOT, 'docs/methods')
const read = (file: string) => readFileSync(file, 'utf8')

/** Every file under a folder, recursively, with one of the given endings. */
function filesUnder(dir: string, endings: string[]): string[] {
  return readdirSync(dir, { withFileTypes: true, recursive: true })
    .filter((e) => e.isFile() && endings.some((end) => e.name.endsWith(end)))
    .map((e) => path.join(e.parentPath, e.name))
}

describe('the methods documentation', () => {
  it('lists every topic file in its index', () => {
    const index = read(path.join(METHODS, 'README.md'))
    const topics = readdirSync(METHODS).filter((f) => f.endsWith('.md') && f !== 'README.md')
    expect(topics.filter((f) => !index.includes(`](${f})`))).toEqual([])
  })

  it('cites the chip grid by the method’s own literature, not by a paper presenting a program', () => {
    const doc = read(path.join(METHODS, 'chip-grid.md'))
    expect(doc).toMatch(/Gore, S\. M\. \(1987\)/)
    expect(doc).toMatch(/Methods to elicit beliefs\s+for Bayesian priors: a systematic review/)
    const code = ['shared', 'src', 'server'].flatMap((d) => filesUnder(path.join(ROOT, d), ['.ts', '.vue']))
    const citing = code.filter((f) => /roulette|chip grid/i.test(read(f)) && /Environ\. Model\. Softw\.|web-based tool/i.test(read(f)))
    expect(citing.map((f) => path.relative(ROOT, f))).toEqual([])
  })

  it('names the published sources of the bounds-first order of the quantile questions', () => {
    const doc = read(path.join(METHODS, 'quantile-answer.md'))
    expect(doc).toMatch(/Spetzler, C\. S\. and Staël von Holstein/)
    expect(doc).toMatch(/Uncertain Judgements/)
  })
})
