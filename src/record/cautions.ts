import { GENERAL_CAUTIONS, recordCautions, type CautionFacts } from '@shared/elicitation/record-cautions'
import type { RecordContent } from '@/api/record'

const GENERAL_RULES = new Set(GENERAL_CAUTIONS.map((c) => c.rule))

/**
 * The record's cautions for the screen: the general ones as paragraphs, this record's own as a list. A record stored
 * before its cautions travelled in the content (plain text) gets its own ones from the same shared rules the server uses.
 */
export function cautionsOnScreen(content: RecordContent): { general: string[]; raised: string[] } {
  if (content.cautions.every((c) => typeof c !== 'string')) {
    const list = content.cautions.filter((c) => typeof c !== 'string')
    return { general: list.filter((c) => GENERAL_RULES.has(c.rule)).map((c) => c.text), raised: list.filter((c) => !GENERAL_RULES.has(c.rule)).map((c) => c.text) }
  }
  const raised = recordCautions(content as unknown as CautionFacts).filter((c) => !GENERAL_RULES.has(c.rule)).map((c) => c.text)
  return { general: content.cautions.map((c) => (typeof c === 'string' ? c : c.text)), raised }
}
