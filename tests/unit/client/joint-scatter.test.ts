import { describe, expect, it } from 'vitest'
import { ref } from 'vue'
import { useJointScatter, type JointScatterInput } from '@/composables/useJointScatter'

describe('the scatter of joint draws', () => {
  const input = (points: { x: number; y: number }[]): JointScatterInput => ({
    points, medians: [1, 10], guideLabels: ['Median of a', 'Median of b'], axisTitles: ['a (h)', 'b'], pointLabel: (p) => `${p.x}; ${p.y}`,
  })

  it('counts how often the second is above its median where the first is above its own (constructed draws)', () => {
    const points = [{ x: 2, y: 11 }, { x: 3, y: 12 }, { x: 4, y: 9 }, { x: 5, y: 15 }, { x: 0, y: 20 }, { x: 1, y: 30 }]
    // Right of x = 1 (strictly): four draws, three of them above y = 10.
    expect(useJointScatter(ref(input(points))).bothAbove.value).toBe(0.75)
    expect(useJointScatter(ref(input([{ x: 0, y: 0 }]))).bothAbove.value).toBeNull()
  })

  it('draws the guides at the medians across the draws’ range, with the axis titles given', () => {
    const { data, options } = useJointScatter(ref(input([{ x: 0, y: 5 }, { x: 3, y: 20 }])))
    const [draws, across, up] = data.value.datasets
    expect(draws.data).toHaveLength(2)
    expect(across).toMatchObject({ label: 'Median of a', data: [{ x: 1, y: 5 }, { x: 1, y: 20 }], showLine: true })
    expect(up).toMatchObject({ label: 'Median of b', data: [{ x: 0, y: 10 }, { x: 3, y: 10 }], showLine: true })
    const scales = options.value.scales as Record<string, { title: { text: string } }>
    expect([scales.x.title.text, scales.y.title.text]).toEqual(['a (h)', 'b'])
  })
})
