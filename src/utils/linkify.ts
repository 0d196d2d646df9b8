export type TextPart = { kind: 'text'; text: string } | { kind: 'link'; text: string; href: string }

const URL_PATTERN = /https?:\/\/[^\s<>"]+/g

/** Splits plain text into text and http(s) links, so links can be shown clickable without rendering HTML. */
export function linkify(text: string): TextPart[] {
  const parts: TextPart[] = []
  let last = 0
  for (const match of text.matchAll(URL_PATTERN)) {
    let url = match[0]
    // Trailing punctuation usually ends the sentence, not the link.
    const trailing = /[.,;:!?)\]]+$/.exec(url)?.[0] ?? ''
    if (trailing) url = url.slice(0, -trailing.length)
    const start = match.index ?? 0
    if (start > last) parts.push({ kind: 'text', text: text.slice(last, start) })
    parts.push({ kind: 'link', text: url, href: url })
    last = start + url.length
  }
  if (last < text.length) parts.push({ kind: 'text', text: text.slice(last) })
  return parts
}
