import { formatExact } from '@shared/format'
import { supportBounds, type Support } from '@shared/stats'

/** The values a quantity can take, in plain words: "any value above 0", "a share from 0 to 1 (0 % to 100 %)", "from 2 to 9", "any value". */
export function supportLabel(support: Support): string {
  switch (support.kind) {
    case 'positive':
      return 'any value above 0'
    case 'proportion':
      return 'a share from 0 to 1 (0 % to 100 %)'
    case 'bounded':
      return `from ${formatExact(support.lower)} to ${formatExact(support.upper)}`
    default:
      return 'any value, negative or positive'
  }
}

/** Edges as the editor shows them: "0, 0.1, 0.25". */
export function formatEdges(edges: readonly number[] | undefined): string {
  return (edges ?? []).map(formatExact).join(', ')
}

export type EdgesParse = { ok: true; edges: number[] } | { ok: false; message: string }

/** The same limits as the shared round schema. */
export const MIN_EDGES = 3
export const MAX_EDGES = 31

/**
 * Reads interval edges typed as numbers separated by commas, semicolons or spaces
 * ("0, 5, 10, 20"). Checks what the server checks: numbers, at least 3 edges (2 intervals),
 * at most 30 intervals, strictly increasing, inside the quantity's support.
 */
export function parseEdges(text: string, support?: Support): EdgesParse {
  const parts = text
    .split(/[,;\s]+/)
    .map((part) => part.trim())
    .filter((part) => part.length > 0)
  if (parts.length === 0) return { ok: false, message: 'Enter the interval edges' }
  const edges: number[] = []
  for (const part of parts) {
    const value = Number(part)
    if (!/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(part) || !Number.isFinite(value)) {
      return { ok: false, message: `“${part}” is not a number; separate the edges with commas` }
    }
    edges.push(value)
  }
  if (edges.length < MIN_EDGES) return { ok: false, message: 'Give at least 3 edges (2 intervals)' }
  if (edges.length > MAX_EDGES) return { ok: false, message: 'Use at most 30 intervals' }
  for (let i = 1; i < edges.length; i++) {
    if (!(edges[i] > edges[i - 1])) return { ok: false, message: 'Interval edges must be strictly increasing' }
  }
  if (support) {
    const { lower, upper } = supportBounds(support)
    if (edges[0] < lower || edges[edges.length - 1] > upper) {
      return { ok: false, message: `Interval edges must lie within the quantity's support [${formatExact(lower)}, ${formatExact(upper)}]` }
    }
  }
  return { ok: true, edges }
}

/** A starting grid for a quantity whose support fixes both ends; otherwise the analyst types the edges. */
export function suggestEdges(support: Support): number[] | undefined {
  if (support.kind === 'proportion') return [0, 0.1, 0.2, 0.4, 0.6, 0.8, 1]
  if (support.kind === 'bounded') {
    const step = (support.upper - support.lower) / 5
    return Array.from({ length: 6 }, (_, i) => Number((support.lower + i * step).toPrecision(10)))
  }
  return undefined
}

/**
 * The intervals the edges make, in words: "0 to under 5", "5 to under 10", … and the last one, which includes its
 * upper end, "20 to 30". A share is written in per cent ("10 % to under 20 %").
 */
export function intervalLabels(edges: readonly number[], support?: Support): string[] {
  const edge = (x: number) => (support?.kind === 'proportion' ? `${formatExact(Number((x * 100).toPrecision(10)))} %` : formatExact(x))
  return edges.slice(1).map((upper, i) => `${edge(edges[i])} to ${i === edges.length - 2 ? '' : 'under '}${edge(upper)}`)
}

/** Whether the intervals between the edges differ in width (beyond rounding of the typed decimals). */
export function unequalWidths(edges: readonly number[]): boolean {
  const widths = edges.slice(1).map((e, i) => e - edges[i])
  const first = widths[0]
  return widths.some((w) => Math.abs(w - first) > 1e-9 * Math.max(1, Math.abs(first)))
}
