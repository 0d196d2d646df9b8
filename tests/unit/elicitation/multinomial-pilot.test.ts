import { describe, expect, it } from 'vitest'
import { extractMultinomialData, PilotDataError } from '../../../shared/elicitation/pilot'
import { readCsvTable } from '../../../shared/elicitation/csv'

// Constructed Kestrel Valley household uptake survey: categories none / partial / full.
const CATEGORIES = ['none', 'partial', 'full']

function refusal(f: () => unknown): PilotDataError {
  try {
    f()
  } catch (e) {
    if (e instanceof PilotDataError) return e
    throw e
  }
  throw new Error('no PilotDataError')
}

describe('multinomial pilot data from a CSV file', () => {
  it('one column per category: a row of counts per line, kept as recorded', () => {
    const t = readCsvTable('district,none,partial,full\nNorth,12,5,3\n\nSouth,8,9,4\n', ',')
    const { data, summary } = extractMultinomialData(t.rows, { layout: 'columns', categoryColumns: CATEGORIES }, t.lines)
    expect(data).toEqual({ model: 'multinomial', counts: [[12, 5, 3], [8, 9, 4]] })
    expect(summary).toEqual({ rows: 2, n: 41, description: 'none 20, partial 14, full 7 (41 in all)' })
  })
  it('one category per row: a single 1 per line, in the composition’s order', () => {
    const t = readCsvTable('household,uptake\nH1,full\nH2, none\nH3,partial\nH4,none\n', ',')
    const { data, summary } = extractMultinomialData(t.rows, { layout: 'rows', categoryColumn: 'uptake', categories: CATEGORIES }, t.lines)
    expect(data.counts).toEqual([[0, 0, 1], [1, 0, 0], [0, 1, 0], [1, 0, 0]])
    expect(summary.n).toBe(4)
  })
  it('refuses the first bad cell with its line and column', () => {
    const t = readCsvTable('district,none,partial,full\nNorth,12,5,3\n\nSouth,8,2.5,4\n', ',')
    const e = refusal(() => extractMultinomialData(t.rows, { layout: 'columns', categoryColumns: CATEGORIES }, t.lines))
    expect([e.line, e.column, e.columnNumber]).toEqual([4, 'partial', 3])
    expect(e.message).toMatch(/whole number/)
    const r = readCsvTable('household,uptake\nH1,full\nH2,most\n', ',')
    const e2 = refusal(() => extractMultinomialData(r.rows, { layout: 'rows', categoryColumn: 'uptake', categories: CATEGORIES }, r.lines))
    expect([e2.line, e2.column]).toEqual([3, 'uptake'])
    expect(e2.message).toContain('expected one of "none", "partial", "full"; found "most"')
    expect(refusal(() => extractMultinomialData(t.rows, { layout: 'columns', categoryColumns: ['none', 'some'] }, t.lines)).message).toMatch(/no column "some"/)
    const zeros = readCsvTable('none,partial\n0,0\n', ',')
    expect(refusal(() => extractMultinomialData(zeros.rows, { layout: 'columns', categoryColumns: ['none', 'partial'] }, zeros.lines)).message).toMatch(/add up to 0/)
  })
})
