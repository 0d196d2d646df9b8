import type { RecordComment, RecordContent } from '@/api/record'

/** Comments the server accepts name their section in at most 80 characters (shared/schemas/records.ts). */
export const SECTION_MAX = 80

export type SectionKind = 'study' | 'panel' | 'calibration' | 'quantity' | 'joint' | 'cautions' | 'review' | 'history'

export interface RecordSectionInfo {
  /** The heading without its number: what comments name as their section. */
  key: string
  number: number
  kind: SectionKind
  /** Index into content.quantities for quantity sections. */
  quantityIndex?: number
  /** Other names a comment may use for this section (a quantity's name or symbol). */
  aliases: string[]
}

const clip = (text: string) => (text.length > SECTION_MAX ? `${text.slice(0, SECTION_MAX - 1)}…` : text)

export const quantityHeading = (q: { name: string; symbol: string }) => clip(`${q.name} (${q.symbol})`)

/**
 * The record's sections in order, numbered as in the .docx: 1 study, 2 panel, 3 calibration, one per quantity, the joint
 * priors when the study has compositions or linked sets (records before schema 1.2 have none), then the rest.
 */
export function recordSections(content: Pick<RecordContent, 'quantities' | 'compositions' | 'linkedSets'>): RecordSectionInfo[] {
  const list: RecordSectionInfo[] = [
    { key: 'Study and decision', number: 1, kind: 'study', aliases: [] },
    { key: 'Expert panel', number: 2, kind: 'panel', aliases: ['Panel'] },
    { key: 'Calibration questions', number: 3, kind: 'calibration', aliases: ['Calibration'] },
  ]
  content.quantities.forEach((q, i) => {
    list.push({ key: quantityHeading(q), number: 4 + i, kind: 'quantity', quantityIndex: i, aliases: [q.name, q.symbol] })
  })
  let n = 4 + content.quantities.length
  if (content.compositions?.length || content.linkedSets?.length) {
    list.push({ key: 'Joint priors', number: n++, kind: 'joint', aliases: [...(content.compositions ?? []).map((c) => c.name), ...(content.linkedSets ?? []).map((s) => s.name)] })
  }
  list.push(
    { key: 'Cautions', number: n, kind: 'cautions', aliases: [] },
    { key: 'Review and sign-off', number: n + 1, kind: 'review', aliases: ['Review'] },
    { key: 'Change history', number: n + 2, kind: 'history', aliases: [] },
  )
  return list
}

const norm = (s: string) => s.trim().replace(/^\d+\.?\s+/, '').toLowerCase()

/** The section a comment belongs to (by heading, with or without its number, or a quantity's name or symbol); null when none matches. */
export function sectionOf(comment: Pick<RecordComment, 'section'>, sections: RecordSectionInfo[]): string | null {
  const wanted = norm(comment.section)
  for (const s of sections) {
    if (norm(s.key) === wanted || s.aliases.some((a) => norm(a) === wanted)) return s.key
  }
  return null
}

/** A comment with, for a return comment, the analyst's answer to it. */
export type ThreadedComment = RecordComment & { answer?: RecordComment | null }

/**
 * Comments by section key, oldest first; comments naming no section of this version ("General", a renamed quantity)
 * under `other`. Answers to return comments travel with the comment they answer, not as comments of their own.
 */
export function groupComments(comments: RecordComment[], sections: RecordSectionInfo[]): { bySection: Record<string, ThreadedComment[]>; other: ThreadedComment[] } {
  const bySection: Record<string, ThreadedComment[]> = {}
  const other: ThreadedComment[] = []
  const answers = new Map(comments.filter((x) => x.kind === 'response').map((x) => [x.replyTo, x]))
  for (const c of [...comments].filter((x) => x.kind !== 'response').sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id)) {
    const threaded: ThreadedComment = c.kind === 'return' ? { ...c, answer: answers.get(c.id) ?? null } : c
    const key = sectionOf(c, sections)
    if (key === null) other.push(threaded)
    else (bySection[key] ??= []).push(threaded)
  }
  return { bySection, other }
}
