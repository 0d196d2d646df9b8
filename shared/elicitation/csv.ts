import Papa from 'papaparse'

/** A problem located in the file: 1-based line (of the file, not of the parsed rows) and 1-based column when known. */
export interface CsvProblem {
  line: number
  column: number | null
  message: string
}

/** The rows of a CSV file (first row the header, blank lines left out) and the file line each row starts on. */
export interface CsvTable {
  rows: string[][]
  lines: number[]
  problem: CsvProblem | null
}

const LINE_BREAK = /\r\n|\r|\n/g

function lineBreaksIn(text: string, from: number, to: number): number {
  LINE_BREAK.lastIndex = 0
  return (text.slice(from, to).match(LINE_BREAK) ?? []).length
}

const blank = (row: string[]) => row.every((c) => c.trim() === '')

/** True when the header is one column whose name holds another usual delimiter: the file was saved with that one. */
export function looksLikeOtherDelimiter(header: string[], delimiter: string): boolean {
  return header.length === 1 && [',', ';', '\t', '|'].some((d) => d !== delimiter && header[0].includes(d))
}

/**
 * Parses CSV text without a header row (papaparse checks field counts only in header mode) and refuses the first
 * unclosed quote or row whose number of fields differs from the header's, located by its line in the file
 * (quoted values may span lines; blank lines are skipped but counted). A one-column header that looks split by
 * another delimiter is left to the column mapping, which names the delimiter.
 */
export function readCsvTable(text: string, delimiter: string): CsvTable {
  const rows: string[][] = []
  const lines: number[] = []
  let problem: CsvProblem | null = null
  let start = 0
  let line = 1
  Papa.parse<string[]>(text, {
    delimiter,
    skipEmptyLines: false,
    step: (result, parser) => {
      const row = result.data
      if (result.errors.some((e) => e.type === 'Quotes')) {
        problem = { line, column: null, message: 'a quoted value is not closed' }
        parser.abort()
        return
      }
      if (!blank(row)) {
        rows.push(row)
        lines.push(line)
      }
      line += lineBreaksIn(text, start, result.meta.cursor)
      start = result.meta.cursor
    },
  })
  if (!problem && rows.length > 1 && !looksLikeOtherDelimiter(rows[0], delimiter)) {
    const width = rows[0].length
    const i = rows.findIndex((r) => r.length !== width)
    if (i > 0) {
      const found = rows[i].length
      problem = { line: lines[i], column: Math.min(width, found) + 1, message: `expected ${width} fields like the header, found ${found}` }
    }
  }
  return { rows, lines, problem }
}
