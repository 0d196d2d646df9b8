/** Chart colours fixed app-wide (the palette of src/styles/theme.css): the expert’s fitted prior amber. */
export const ANSWER_CHART = {
  prior: '#c9821a',
  point: '#8a5a12',
} as const

/** Muted tones for the other experts (Expert 1, 2, …), none close to amber, green or ink. */
const MUTED = ['#7d95ad', '#b08a94', '#9a8cb3', '#7fa3a8', '#a3927f', '#a584a0', '#8790b8', '#8ea684'] as const

export function mutedTone(index: number): string {
  return MUTED[index % MUTED.length]
}
