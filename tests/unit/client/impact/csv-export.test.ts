import { describe, expect, it } from 'vitest'
import { candidateRows, candidatesCsv, csvCell, toCsv } from '@/impact/table'
import type { ImpactResult } from '@/api/impact'

const candidate = (over: Partial<ImpactResult['candidates'][number]>): ImpactResult['candidates'][number] => ({
  key: 'reconciled', label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'gamma', shape: 6, rate: 0.5 },
  priorSummary: { mean: 12, q025: 4.4, q975: 23.3 }, logEvidence: -18.5, method: 'closed-form',
  posterior: { mean: 10.4, sd: 1.09, q025: 8.3, q50: 10.3, q975: 12.6 }, priorPredictiveP: 0.45, logPriorPredictiveP: Math.log(0.45), priorEss: 0.5,
  bayesFactor: { logBF: Math.log(4), twoLnBF: 2 * Math.log(4), label: 'positive' },
  fractionalBayesFactor: { logBF: Math.log(1.5), b: 0.125 }, sensitivity: { prior: 0.08, likelihood: 0.02, diagnosis: 'weak-likelihood' }, diagnosticNotes: [],
  decision: null, flags: [],
  ...over,
})

/** The reconciled prior and a comparison prior whose sensitivity could not be computed (no Bayes factors of its own). */
const withComparison = (over: Partial<ImpactResult['candidates'][number]>) => ({
  n: 8,
  candidates: [
    candidate({}),
    candidate({
      key: 'comparison', label: 'Comparison prior', kind: 'comparison', bayesFactor: null, fractionalBayesFactor: null, sensitivity: null,
      diagnosticNotes: ['The power-scaling sensitivity could not be computed: choose a power nearer 1.'], ...over,
    }),
  ],
})

describe('CSV export of the candidates table', () => {
  it('quotes fields with commas, quotes or line breaks and doubles the quotes', () => {
    expect(csvCell('plain')).toBe('plain')
    expect(csvCell('Pooled (linear, equal weights)')).toBe('"Pooled (linear, equal weights)"')
    expect(csvCell('the “Expert” said "wide"')).toBe('"the “Expert” said ""wide"""')
    expect(csvCell('two\nlines')).toBe('"two\nlines"')
    expect(csvCell(-18.5)).toBe('-18.5')
    expect(csvCell(null)).toBe('')
    expect(csvCell(Number.NaN)).toBe('')
    expect(csvCell(true)).toBe('true')
  })

  it('keeps a spreadsheet from running text as a formula', () => {
    expect(csvCell('=HYPERLINK("x")')).toBe('"\'=HYPERLINK(""x"")"')
    expect(csvCell('+1')).toBe("'+1")
    expect(csvCell('@sum')).toBe("'@sum")
  })

  it('joins cells with commas and rows with CRLF', () => {
    expect(toCsv([['a', 'b,c'], [1, null]])).toBe('a,"b,c"\r\n1,\r\n')
  })

  it('writes one row per candidate, unrounded, with the unit in the headers and the flags joined', () => {
    const result = withComparison({ priorEss: 20, flags: ['prior-dominates', 'prior-data-conflict'] })
    const csv = candidatesCsv(candidateRows(result), 'bursts per 100 km, per year')
    const lines = csv.trimEnd().split('\r\n')
    expect(lines).toHaveLength(3)
    expect(lines[0]).toContain('"prior mean (bursts per 100 km, per year)"')
    expect(lines[0].split(',').slice(-4)).toEqual(['pilot n', 'P(decision rule)', 'act', 'flags'])
    expect(lines[1].startsWith('Reconciled prior,reconciled,"Gamma(shape 6, rate 0.5)",12,4.4,23.3,10.4,1.09,8.3,12.6,-18.5,')).toBe(true)
    expect(lines[1]).toContain(`,${Math.log(4)},${Math.exp(Math.log(4))},positive,`)
    expect(lines[1]).toContain(',0.45,0.5,8,,,')
    expect(lines[2]).toContain(',0.45,20,8,,,prior-dominates; prior-data-conflict')
  })

  it('adds the fractional Bayes factor with its b and both power-scaling sensitivities with the diagnosis in words', () => {
    const result = withComparison({})
    const lines = candidatesCsv(candidateRows(result)).trimEnd().split('\r\n')
    const header = lines[0].split(',')
    const at = header.indexOf('log fractional Bayes factor vs comparison prior')
    expect(header.slice(at, at + 6)).toEqual([
      'log fractional Bayes factor vs comparison prior', 'fractional Bayes factor vs comparison prior', 'training fraction b',
      'prior sensitivity (power scaling)', 'likelihood sensitivity (power scaling)', 'sensitivity diagnosis',
    ])
    expect(lines[1]).toContain(`,positive,${Math.log(1.5)},${Math.exp(Math.log(1.5))},0.125,0.08,0.02,The data say little here: the result follows the prior.,0.45,`)
    expect(lines[2]).toContain(',,,,,,,,The power-scaling sensitivity could not be computed: choose a power nearer 1.,')
  })
})
