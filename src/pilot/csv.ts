import { readCsvTable } from '@shared/elicitation/csv'
import { PILOT_MAX_BYTES, PILOT_MAX_ROWS } from '@shared/elicitation/pilot'
import { formatBytes, formatCount } from '@shared/format'
import type { Delimiter } from '@/api/pilot'

export const DELIMITERS: readonly { value: Delimiter; label: string; name: string }[] = [
  { value: ',', label: 'Comma', name: 'commas' },
  { value: ';', label: 'Semicolon', name: 'semicolons' },
  { value: '\t', label: 'Tab', name: 'tabs' },
]

/** Data rows shown in the local preview. */
export const PREVIEW_ROWS = 10

const MAX_MB = Math.round(PILOT_MAX_BYTES / (1024 * 1024))
const rowsText = formatCount(PILOT_MAX_ROWS)
/** "CSV text (UTF-8), at most 2 MB and 100,000 data rows". */
export const LIMITS_TEXT = `CSV text (UTF-8), at most ${MAX_MB} MB and ${rowsText} data rows, first line the column names`

/** What the browser read from the file, before anything is sent. */
export interface LocalPreview {
  columns: string[]
  /** The first PREVIEW_ROWS data rows. */
  rows: string[][]
  /** Data rows (the header not counted; blank lines skipped). */
  rowCount: number
  /** Problems found while reading, each located by line; the server checks the whole file again. */
  problems: string[]
  /** Another delimiter that splits the header into columns, when the chosen one does not. */
  suggestedDelimiter: Delimiter | null
}

/** A problem with the file's size, before reading it. */
export function sizeProblem(bytes: number): string | null {
  if (bytes === 0) return 'The file is empty.'
  if (bytes > PILOT_MAX_BYTES) return `The file is ${formatBytes(bytes)}; pilot data files may be at most ${MAX_MB} MB.`
  return null
}

/**
 * Parses CSV text with papaparse for the preview: column names, the first rows, the row count, and
 * the same located problems the server reports (unclosed quote, a line with another number of
 * columns than the header, too many rows).
 */
export function previewText(text: string, delimiter: Delimiter, previewRows = PREVIEW_ROWS): LocalPreview {
  const { rows: table, problem } = readCsvTable(text.replace(/^\uFEFF/, ''), delimiter)
  const header = (table[0] ?? []).map((h) => h.trim())
  const body = table.slice(1)
  const problems: string[] = []
  if (problem) problems.push(`Line ${problem.line}: ${problem.message}.`)
  else if (table.length === 0) problems.push('The file is empty.')
  else if (body.length === 0) problems.push('Line 2: The file has a header but no data rows.')
  if (body.length > PILOT_MAX_ROWS) problems.push(`The file has ${formatCount(body.length)} data rows; at most ${rowsText} are accepted.`)
  let suggestedDelimiter: Delimiter | null = null
  if (header.length === 1) {
    const other = DELIMITERS.find((d) => d.value !== delimiter && header[0].includes(d.value))
    if (other) suggestedDelimiter = other.value
  }
  return { columns: header, rows: body.slice(0, previewRows), rowCount: body.length, problems, suggestedDelimiter }
}

/** Reads a chosen file as UTF-8 text and previews it; a file over the size limit is not read. */
export async function previewFile(file: File, delimiter: Delimiter): Promise<LocalPreview> {
  const tooBig = sizeProblem(file.size)
  if (tooBig) return { columns: [], rows: [], rowCount: 0, problems: [tooBig], suggestedDelimiter: null }
  return previewText(await file.text(), delimiter)
}

const isNumber = (cell: string | undefined) => cell !== undefined && cell.trim() !== '' && Number.isFinite(Number(cell.trim()))

/** Columns whose previewed cells are all numbers (or all 0/1 when `binary`). */
export function numericColumns(preview: Pick<LocalPreview, 'columns' | 'rows'>, binary = false): string[] {
  return preview.columns.filter((_, i) => {
    const cells = preview.rows.map((r) => r[i])
    if (cells.length === 0 || !cells.every(isNumber)) return false
    return !binary || cells.every((c) => c!.trim() === '0' || c!.trim() === '1')
  })
}
