import { decimalSum, type MultinomialData, type PilotData, type PriorDistribution } from '../stats/index'

export const PILOT_MODELS = ['normal-known-sigma', 'normal', 'binomial', 'poisson'] as const
export type PilotModel = (typeof PILOT_MODELS)[number]
export const PILOT_MODEL_LABELS: Record<PilotModel, string> = {
  'normal-known-sigma': 'Normal, known σ',
  normal: 'Normal, unknown σ',
  binomial: 'Binomial',
  poisson: 'Poisson with exposure',
}
export const PILOT_MAX_BYTES = 2 * 1024 * 1024
export const PILOT_MAX_ROWS = 100_000

/** Which columns feed the likelihood; the unused ones are ignored. */
export type PilotMapping =
  | { model: 'normal-known-sigma'; valueColumn: string; sigma: number }
  | { model: 'normal'; valueColumn: string; sigmaPrior: PriorDistribution }
  | { model: 'binomial'; successesColumn: string; trialsColumn: string }
  | { model: 'binomial'; binaryColumn: string }
  | { model: 'poisson'; countColumn: string; exposureColumn: string }

/** A problem in the file, located for the person who has to fix it. */
export class PilotDataError extends Error {
  constructor(message: string, public line: number | null = null, public column: string | null = null, public columnNumber: number | null = null) {
    super(line !== null ? `Line ${line}${column ? `, column "${column}"` : ''}: ${message}` : message)
  }
}

export interface PilotSummary {
  rows: number
  /** Sample size the prior is compared with (observations, trials, or total exposure). */
  n: number
  description: string
}

const DELIMITER_NAMES: Record<string, string> = { ';': 'semicolons', '\t': 'tabs', '|': 'vertical bars', ',': 'commas' }

function columnIndex(header: string[], name: string): number {
  const i = header.indexOf(name)
  if (i >= 0) return i
  const other = header.length === 1 ? [';', '\t', '|', ','].find((d) => header[0].includes(d)) : undefined
  if (other) {
    throw new PilotDataError(`The file has a single column; its lines look separated by ${DELIMITER_NAMES[other]}. Choose that delimiter, or save the file with the one chosen.`, 1)
  }
  throw new PilotDataError(`There is no column "${name}". The columns are: ${header.map((h) => `"${h}"`).join(', ')}.`, 1)
}

function numberAt(row: string[], col: number, line: number, name: string, rule: 'real' | 'count' | 'positive' | 'binary'): number {
  const raw = (row[col] ?? '').trim()
  const refuse = (message: string) => new PilotDataError(message, line, name, col + 1)
  if (raw === '') throw refuse('the cell is empty; expected a number')
  const v = Number(raw)
  if (!Number.isFinite(v)) throw refuse(`expected a number, found "${raw.slice(0, 40)}"`)
  if (rule === 'count' && !(Number.isInteger(v) && v >= 0)) throw refuse(`expected a whole number 0 or more, found "${raw}"`)
  if (rule === 'positive' && !(v > 0)) throw refuse(`expected a number above 0, found "${raw}"`)
  if (rule === 'binary' && v !== 0 && v !== 1) throw refuse(`expected 0 or 1, found "${raw}"`)
  return v
}

/**
 * Turns parsed CSV rows (first row the header) into the engine's pilot data for the chosen model,
 * with a located message for the first bad cell. Blank lines are ignored; `fileLines` gives the file line
 * each row of `table` starts on (a quoted value may span lines), else rows are taken as consecutive lines.
 */
export function extractPilotData(table: string[][], mapping: PilotMapping, fileLines?: number[]): { data: PilotData; summary: PilotSummary } {
  const kept = table.map((r, i) => ({ r, line: fileLines?.[i] ?? i + 1 })).filter(({ r }) => r.some((c) => c.trim() !== ''))
  const rows = kept.map((k) => k.r)
  if (rows.length === 0) throw new PilotDataError('The file is empty.')
  const [header, ...body] = rows
  const names = header.map((h) => h.trim())
  if (body.length === 0) throw new PilotDataError('The file has a header but no data rows.', 2)
  if (body.length > PILOT_MAX_ROWS) throw new PilotDataError(`The file has ${body.length} data rows; at most ${PILOT_MAX_ROWS} are accepted.`)
  const line = (i: number) => kept[i + 1].line
  switch (mapping.model) {
    case 'normal-known-sigma':
    case 'normal': {
      const c = columnIndex(names, mapping.valueColumn)
      const values = body.map((r, i) => numberAt(r, c, line(i), mapping.valueColumn, 'real'))
      const mean = decimalSum(values) / values.length
      const data: PilotData = mapping.model === 'normal-known-sigma'
        ? { model: 'normal-known-sigma', sigma: mapping.sigma, values }
        : { model: 'normal', values, sigmaPrior: mapping.sigmaPrior }
      return { data, summary: { rows: values.length, n: values.length, description: `${values.length} values, mean ${mean.toPrecision(4)}` } }
    }
    case 'binomial': {
      if ('binaryColumn' in mapping) {
        const c = columnIndex(names, mapping.binaryColumn)
        const ys = body.map((r, i) => numberAt(r, c, line(i), mapping.binaryColumn, 'binary'))
        const successes = ys.reduce((s, v) => s + v, 0)
        const rows = { successes: ys, trials: ys.map(() => 1) }
        return { data: { model: 'binomial', successes, trials: ys.length, rows }, summary: { rows: ys.length, n: ys.length, description: `${successes} of ${ys.length}` } }
      }
      const cs = columnIndex(names, mapping.successesColumn)
      const ct = columnIndex(names, mapping.trialsColumn)
      let successes = 0
      let trials = 0
      const rows = { successes: [] as number[], trials: [] as number[] }
      body.forEach((r, i) => {
        const s = numberAt(r, cs, line(i), mapping.successesColumn, 'count')
        const t = numberAt(r, ct, line(i), mapping.trialsColumn, 'count')
        if (s > t) throw new PilotDataError(`${s} successes is more than the ${t} trials on this line`, line(i), mapping.successesColumn, cs + 1)
        successes += s
        trials += t
        rows.successes.push(s)
        rows.trials.push(t)
      })
      if (trials === 0) throw new PilotDataError('The trials add up to 0; there is nothing to learn from.')
      return { data: { model: 'binomial', successes, trials, rows }, summary: { rows: body.length, n: trials, description: `${successes} of ${trials}` } }
    }
    case 'poisson': {
      const cc = columnIndex(names, mapping.countColumn)
      const ce = columnIndex(names, mapping.exposureColumn)
      const counts = body.map((r, i) => numberAt(r, cc, line(i), mapping.countColumn, 'count'))
      const exposures = body.map((r, i) => numberAt(r, ce, line(i), mapping.exposureColumn, 'positive'))
      const total = counts.reduce((s, v) => s + v, 0)
      const exposure = decimalSum(exposures)
      return { data: { model: 'poisson', counts, exposures }, summary: { rows: counts.length, n: exposure, description: `${total} events over ${exposure} exposure units` } }
    }
  }
}

/**
 * Where the categories of multinomial pilot data are: one count column per category, in the composition's order
 * (`columns`), or one observation per row with its category named in a column (`rows`).
 */
export type MultinomialMapping =
  | { layout: 'columns'; categoryColumns: string[] }
  | { layout: 'rows'; categoryColumn: string; categories: string[] }

/**
 * Turns parsed CSV rows (first row the header) into multinomial counts as recorded: a row of counts per line
 * (`columns`), or a row with a single 1 per line (`rows`), so the evidence keeps each line's multinomial coefficient.
 * Blank lines are ignored; the first bad cell is refused with its line and column.
 */
export function extractMultinomialData(table: string[][], mapping: MultinomialMapping, fileLines?: number[]): { data: MultinomialData; summary: PilotSummary } {
  const kept = table.map((r, i) => ({ r, line: fileLines?.[i] ?? i + 1 })).filter(({ r }) => r.some((c) => c.trim() !== ''))
  if (kept.length === 0) throw new PilotDataError('The file is empty.')
  const [header, ...body] = kept
  const names = header.r.map((h) => h.trim())
  if (body.length === 0) throw new PilotDataError('The file has a header but no data rows.', 2)
  if (body.length > PILOT_MAX_ROWS) throw new PilotDataError(`The file has ${body.length} data rows; at most ${PILOT_MAX_ROWS} are accepted.`)
  let counts: number[][]
  let categories: string[]
  if (mapping.layout === 'columns') {
    if (mapping.categoryColumns.length < 2) throw new PilotDataError('Choose one column for each category, at least two.')
    categories = mapping.categoryColumns
    const cols = categories.map((c) => columnIndex(names, c))
    counts = body.map(({ r, line }) => cols.map((c, j) => numberAt(r, c, line, categories[j], 'count')))
  } else {
    if (mapping.categories.length < 2) throw new PilotDataError('A composition has at least two categories.')
    categories = mapping.categories
    const c = columnIndex(names, mapping.categoryColumn)
    counts = body.map(({ r, line }) => {
      const raw = (r[c] ?? '').trim()
      const k = categories.findIndex((name) => name.trim() === raw)
      if (k < 0) {
        const found = raw === '' ? 'the cell is empty' : `found "${raw.slice(0, 40)}"`
        throw new PilotDataError(`expected one of ${categories.map((n) => `"${n}"`).join(', ')}; ${found}`, line, mapping.categoryColumn, c + 1)
      }
      return categories.map((_, j) => (j === k ? 1 : 0))
    })
  }
  const totals = categories.map((_, j) => counts.reduce((s, row) => s + row[j], 0))
  const n = totals.reduce((s, x) => s + x, 0)
  if (n === 0) throw new PilotDataError('The counts add up to 0; there is nothing to learn from.')
  const description = categories.map((name, j) => `${name} ${totals[j]}`).join(', ') + ` (${n} in all)`
  return { data: { model: 'multinomial', counts }, summary: { rows: body.length, n, description } }
}
