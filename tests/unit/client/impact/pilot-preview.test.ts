import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { PILOT_MAX_ROWS } from '@shared/elicitation/pilot'
import { numericColumns, previewText, sizeProblem } from '@/pilot/csv'
import { guessColumns, mappingFields, uploadFieldsOf } from '@/pilot/mapping'

const burstLogs = readFileSync(new URL('../../../../seeds/pilot/burst-logs.csv', import.meta.url), 'utf8')

describe('local preview of a pilot CSV (papaparse in the browser)', () => {
  it('reports the column names, the first rows and the row count of the demo burst logs', () => {
    const p = previewText(burstLogs, ',')
    expect(p.columns).toEqual(['district', 'bursts', 'exposure_100km_years'])
    expect(p.rowCount).toBe(8)
    expect(p.rows[0]).toEqual(['KV-01', '11', '1.10'])
    expect(p.problems).toEqual([])
    expect(p.suggestedDelimiter).toBeNull()
  })

  it('shows at most ten rows, trims header names and drops a byte-order mark', () => {
    const text = '\uFEFF id , joins\n' + Array.from({ length: 25 }, (_, i) => `${i},${i % 2}`).join('\n') + '\n\n'
    const p = previewText(text, ',')
    expect(p.columns).toEqual(['id', 'joins'])
    expect(p.rows).toHaveLength(10)
    expect(p.rowCount).toBe(25)
    expect(numericColumns(p, true)).toEqual(['joins'])
  })

  it('suggests the delimiter the lines use when the chosen one leaves a single column', () => {
    const p = previewText('district;bursts;exposure\nA;3;1.2\n', ',')
    expect(p.columns).toEqual(['district;bursts;exposure'])
    expect(p.suggestedDelimiter).toBe(';')
    expect(previewText('district;bursts;exposure\nA;3;1.2\n', ';').columns).toEqual(['district', 'bursts', 'exposure'])
    expect(previewText('a\tb\n1\t2\n', '\t').columns).toEqual(['a', 'b'])
  })

  it('locates problems by line: a line with another number of columns than the header, no data rows, too many rows', () => {
    expect(previewText('a,b\n1,2\n3,4,5\n', ',').problems).toEqual(['Line 3: expected 2 fields like the header, found 3.'])
    expect(previewText('a,b\n"x\ny",2\n\n3\n', ',').problems).toEqual(['Line 5: expected 2 fields like the header, found 1.'])
    expect(previewText('a,b\n', ',').problems).toEqual(['Line 2: The file has a header but no data rows.'])
    const many = 'x\n' + '1\n'.repeat(PILOT_MAX_ROWS + 1)
    expect(previewText(many, ',').problems).toEqual(['The file has 100,001 data rows; at most 100,000 are accepted.'])
    expect(sizeProblem(0)).toBe('The file is empty.')
    expect(sizeProblem(3 * 1024 * 1024)).toBe('The file is 3.0 MB; pilot data files may be at most 2 MB.')
    expect(sizeProblem(1000)).toBeNull()
  })
})

describe('mapping the columns to the likelihood model', () => {
  it('asks for the fields each model needs', () => {
    expect(mappingFields('normal-known-sigma')).toEqual(['valueColumn', 'sigma'])
    expect(mappingFields('normal')).toEqual(['valueColumn', 'sigmaPriorScale'])
    expect(mappingFields('binomial', 'counts')).toEqual(['binomialLayout', 'successesColumn', 'trialsColumn'])
    expect(mappingFields('binomial', 'binary')).toEqual(['binomialLayout', 'binaryColumn'])
    expect(mappingFields('poisson')).toEqual(['countColumn', 'exposureColumn'])
    expect(mappingFields(undefined)).toEqual([])
  })

  it('preselects the counts and exposure columns of the burst logs', () => {
    expect(guessColumns(previewText(burstLogs, ','), 'poisson')).toMatchObject({ countColumn: 'bursts', exposureColumn: 'exposure_100km_years' })
  })

  it('sends only the fields of the chosen model', () => {
    const body = uploadFieldsOf({
      quantityId: '3', name: ' Burst logs ', model: 'poisson', delimiter: ',', countColumn: 'bursts', exposureColumn: 'exposure_100km_years',
      valueColumn: 'district', sigma: 2, binaryColumn: 'x',
    })
    expect(body).toEqual({ quantityId: 3, name: 'Burst logs', model: 'poisson', delimiter: ',', countColumn: 'bursts', exposureColumn: 'exposure_100km_years' })
  })
})
