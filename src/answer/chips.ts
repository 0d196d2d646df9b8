import { niceStep } from '@shared/format/axis'

/** What a key press on a chip-grid bin does: move the focus to another bin, or add or remove a chip. */
export type ChipAction = { type: 'focus'; index: number } | { type: 'add'; index: number } | { type: 'remove'; index: number }

/**
 * Keyboard of the chip grid (one tab stop; arrows move between bins, like a row of sliders):
 * ← → move, Home / End jump to the first / last bin; ↑, + (or =), Enter and Space add a chip; ↓, −, Delete and
 * Backspace remove one. Other keys do nothing (null), so Tab still leaves the grid.
 */
export function chipKeyAction(key: string, index: number, bins: number): ChipAction | null {
  switch (key) {
    case 'ArrowLeft':
      return { type: 'focus', index: Math.max(0, index - 1) }
    case 'ArrowRight':
      return { type: 'focus', index: Math.min(bins - 1, index + 1) }
    case 'Home':
      return { type: 'focus', index: 0 }
    case 'End':
      return { type: 'focus', index: bins - 1 }
    case 'ArrowUp':
    case '+':
    case '=':
    case 'Add':
    case 'Enter':
    case ' ':
      return { type: 'add', index }
    case 'ArrowDown':
    case '-':
    case '_':
    case '−':
    case 'Subtract':
    case 'Delete':
    case 'Backspace':
      return { type: 'remove', index }
    default:
      return null
  }
}

export function chipsPlaced(chips: readonly number[]): number {
  return chips.reduce((s, c) => s + c, 0)
}

export function chipsLeft(chips: readonly number[], total: number): number {
  return Math.max(0, total - chipsPlaced(chips))
}

/** The counts after adding or removing one chip; unchanged when no chip is left or the bin is empty. */
export function applyChip(chips: readonly number[], total: number, action: ChipAction): number[] {
  const next = [...chips]
  if (action.type === 'add' && chipsLeft(chips, total) > 0) next[action.index] += 1
  else if (action.type === 'remove' && next[action.index] > 0) next[action.index] -= 1
  return next
}

/** One bin of the chip grid drawn to scale: its place on the value axis (fractions of the grid's span) and height. */
export interface ScaledColumn {
  /** Left edge and width as fractions of the whole grid (edges[0] to the last edge). */
  left: number
  width: number
  /** Chips per one unit of the quantity (chips ÷ bin width): the column's height in the axis's own units. */
  perUnit: number
  /** Height of the column and of one chip in it, as fractions of the drawing's height (the top is `top`). */
  height: number
  chip: number
}

export interface ChipScale {
  columns: ScaledColumn[]
  /** Value at the top of the drawing, in chips per unit, and the gridline values below it. */
  top: number
  ticks: number[]
}

export { niceStep }

/**
 * The chip grid as a histogram drawn to scale: each column spans its bin on a linear value axis and its height is
 * chips per unit width, so that every chip has the same area (the usual histogram convention for unequal bins) and a
 * fitted density times the number of chips reads on the same axis. `curvePeak` is that curve's highest value, so
 * the top of the drawing holds both.
 */
export function chipScale(edges: readonly number[], chips: readonly number[], curvePeak = 0): ChipScale {
  const lo = edges[0]
  const span = edges[edges.length - 1] - lo
  const widths = edges.slice(1).map((e, i) => e - edges[i])
  const perUnit = widths.map((w, i) => (chips[i] ?? 0) / w)
  const highest = Math.max(...perUnit, Number.isFinite(curvePeak) ? curvePeak : 0)
  // An empty grid still shows a scale: room for one chip in the narrowest bin.
  const reach = highest > 0 ? highest : 1 / Math.min(...widths)
  const step = niceStep(reach)
  const top = Math.ceil(reach / step - 1e-9) * step
  const ticks = Array.from({ length: Math.round(top / step) }, (_, i) => Number(((i + 1) * step).toPrecision(12)))
  const columns = widths.map((w, i) => ({
    left: (edges[i] - lo) / span,
    width: w / span,
    perUnit: perUnit[i],
    height: perUnit[i] / top,
    chip: 1 / (w * top),
  }))
  return { columns, top, ticks }
}

/**
 * Which edge labels to show under a drawing `width` px wide so that none overlaps its neighbour: the first and the
 * last always, the others from the left when at least `gap` px (plus the label's own width) from the one before.
 */
export function visibleEdgeLabels(positions: readonly number[], labels: readonly string[], width: number, charWidth = 7, gap = 6): boolean[] {
  const n = positions.length
  const shown = positions.map(() => false)
  if (!n) return shown
  const room = (i: number, j: number) => Math.abs(positions[j] - positions[i]) * width >= ((labels[i].length + labels[j].length) * charWidth) / 2 + gap
  shown[0] = true
  let last = 0
  for (let i = 1; i < n - 1; i++) {
    if (room(last, i) && room(i, n - 1)) {
      shown[i] = true
      last = i
    }
  }
  if (n > 1) shown[n - 1] = true
  return shown
}
