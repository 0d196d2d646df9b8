/** Chart colours fixed app-wide (the palette of src/styles/theme.css). */
export const CHART = {
  prior: '#c9821a',
  likelihood: '#5b6b7a',
  posterior: '#1f6f5c',
  pooled: '#1d2733',
} as const

/** Muted, distinct tones for individual experts: none is close to the prior amber, posterior green or pool ink. */
export const EXPERT_TONES = ['#5f87ad', '#b0707f', '#8b6fb0', '#5f9aa6', '#8c7b6b', '#9a5f8b', '#6b74b0', '#7a9a6b'] as const

export function expertTone(index: number): string {
  return EXPERT_TONES[index % EXPERT_TONES.length]
}
