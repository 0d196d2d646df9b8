import type { Knex } from 'knex'
import { rewordStoredWork } from '../server/db/reword-stored-work'

/*
 * The study-wide anonymous expert label was a letter ("Expert A", …, "Expert Z", "Expert AA" in spreadsheet-column
 * order) and is now a number ("Expert 1", "Expert 2", …, the same join order). Stored analyses and stored record
 * snapshots are rewritten so old work shows and exports today's labels. Only text the program generated changes:
 * names and what people typed (rationales, reasons, notes, declarations, titles) stay exactly as they were. A
 * rewritten snapshot gets its new content hash, and its study's audit chain an event naming the old and new hash.
 */

type Json = Record<string, unknown>

/** Keys whose strings are a person's name or text someone typed: never rewritten, nor anything beneath them. */
const TYPED_TEXT = new Set([
  'name', 'owner', 'title', 'context', 'question', 'unit', 'rationale', 'reason', 'weightsReason', 'adjustReason',
  'impactNotRunReason', 'assumptions', 'evidenceNotes', 'expertise', 'interestsText', 'comment', 'comments', 'body',
  'note', 'notes', 'filename', 'modelCode',
])
/** Keys whose strings are sentences the program wrote (findings, cautions, weight lines, fit warnings, labels). */
const GENERATED_TEXT = new Set(['findings', 'cautions', 'text', 'weightCautions', 'warnings', 'label', 'message', 'rule'])

const LETTER_LABEL = /^Expert ([A-Z]{1,3})$/
const LETTER_LABEL_IN_TEXT = /\bExpert ([A-Z]{1,3})\b/g

/** The 1-based number of spreadsheet-column letters: A → 1, Z → 26, AA → 27 (common practice, bijective base 26). */
function lettersToNumber(letters: string): number {
  let n = 0
  for (const ch of letters) n = n * 26 + (ch.charCodeAt(0) - 64)
  return n
}

/** A stored string in today's labels: a whole letter label anywhere; letter labels inside generated sentences. */
function relabel(text: string, key: string | null): string {
  const whole = LETTER_LABEL.exec(text)
  if (whole) return `Expert ${lettersToNumber(whole[1])}`
  if (key !== null && GENERATED_TEXT.has(key)) return text.replace(LETTER_LABEL_IN_TEXT, (_, letters: string) => `Expert ${lettersToNumber(letters)}`)
  return text
}

/** Stored JSON with its letter labels numbered; `key` is the object key the value sits under (arrays pass theirs on). */
export function numberExpertLabels(value: unknown, key: string | null = null): unknown {
  if (key !== null && TYPED_TEXT.has(key)) return value
  if (typeof value === 'string') return relabel(value, key)
  if (Array.isArray(value)) return value.map((v) => numberExpertLabels(v, key))
  if (value && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value as Json).map(([k, v]) => [k, numberExpertLabels(v, k)]))
  }
  return value
}

export async function up(knex: Knex): Promise<void> {
  await rewordStoredWork(knex, { impactInput: numberExpertLabels, impactResult: numberExpertLabels, recordContent: numberExpertLabels, reason: 'expert labels numbered' })
}

export async function down(): Promise<void> {
  // Stored labels stay numbered: the letters are not restored.
}
