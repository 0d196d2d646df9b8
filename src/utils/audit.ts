import { actionLabel } from '@shared/record/format'

/** "quantity.update" → "Quantity edited"; unknown codes become readable words ("widget.polish" → "Widget polish"). */
export const auditActionLabel = actionLabel

const SUBJECT_KINDS: Record<string, string> = {
  study: 'Study',
  quantity: 'Quantity',
  round: 'Round',
  user: 'User',
  calibration: 'Calibration question',
  judgement: 'Judgement',
  dataset: 'Dataset',
  record: 'Record',
}

/** "quantity:12" → "Quantity 12", or the name when `names` knows it ("Quantity: Burst rate"). */
export function auditSubjectLabel(subject: string | null, names: Record<string, string> = {}): string {
  if (!subject) return '—'
  const [kind, id] = subject.split(':', 2)
  const kindLabel = SUBJECT_KINDS[kind ?? ''] ?? kind ?? subject
  const name = names[subject]
  if (name) return `${kindLabel}: ${name}`
  return id ? `${kindLabel} ${id}` : kindLabel
}

const MAX_VALUE = 60

function short(value: unknown): string {
  let text: string
  if (value === null || value === undefined) text = '—'
  else if (typeof value === 'string') text = value === '' ? '(empty)' : value
  else if (typeof value === 'number' || typeof value === 'boolean') text = String(value)
  else if (Array.isArray(value)) text = value.map((v) => (typeof v === 'object' ? JSON.stringify(v) : String(v))).join(', ')
  else if (typeof value === 'object' && 'kind' in value) {
    // a quantity's support
    const s = value as { kind: string; lower?: number; upper?: number }
    text = s.kind === 'bounded' ? `bounded [${s.lower}, ${s.upper}]` : s.kind
  } else text = JSON.stringify(value)
  text = text.replace(/\s+/g, ' ')
  return text.length > MAX_VALUE ? `${text.slice(0, MAX_VALUE - 1)}…` : text
}

const same = (a: unknown, b: unknown): boolean => JSON.stringify(a) === JSON.stringify(b)

const isPlainObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v)

/**
 * A compact, one-line reading of an event's details: "before → after" for what changed
 * (a `before`/`after` pair, or `xBefore`/`xAfter` keys), then the remaining facts as "key: value".
 */
export function auditDetailParts(details: Record<string, unknown> | null | undefined): string[] {
  if (!isPlainObject(details)) return []
  const parts: string[] = []
  const used = new Set<string>()

  if ('before' in details || 'after' in details) {
    used.add('before').add('after')
    const before = details.before
    const after = details.after
    if (isPlainObject(before) || isPlainObject(after)) {
      const b = isPlainObject(before) ? before : {}
      const a = isPlainObject(after) ? after : {}
      for (const key of new Set([...Object.keys(b), ...Object.keys(a)])) {
        if (!same(b[key], a[key])) parts.push(`${key}: ${short(b[key])} → ${short(a[key])}`)
      }
    } else if (!same(before, after)) {
      parts.push(`${short(before)} → ${short(after)}`)
    }
  }

  for (const key of Object.keys(details)) {
    const match = /^(.*)Before$/.exec(key)
    if (!match) continue
    const base = match[1] ?? ''
    const afterKey = `${base}After`
    if (!(afterKey in details)) continue
    used.add(key).add(afterKey)
    if (!same(details[key], details[afterKey])) parts.push(`${humanKey(base)}: ${short(details[key])} → ${short(details[afterKey])}`)
  }

  for (const [key, value] of Object.entries(details)) {
    if (used.has(key)) continue
    if (key === 'changed' && Array.isArray(value)) {
      if (value.length) parts.push(`changed: ${value.map((v) => humanKey(String(v))).join(', ')}`)
      continue
    }
    parts.push(`${humanKey(key)}: ${short(value)}`)
  }
  return parts
}

/** "trueValue" → "true value", "support_kind" → "support kind". */
function humanKey(key: string): string {
  return key.replace(/_/g, ' ').replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase()
}
