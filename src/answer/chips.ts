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
