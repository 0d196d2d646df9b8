import { describe, expect, it } from 'vitest'
import { densityData, type DensityCurve } from '@/composables/useDensityChart'

const flat = (id: string, extra: Partial<DensityCurve> = {}): DensityCurve => ({ id, label: id, pdf: () => 1, color: '#c9821a', ...extra })

describe('density curves told apart without colour', () => {
  it('draws markers along a curve that asks for them, and none on the others', () => {
    const data = densityData([flat('mine', { markers: true, width: 3 }), flat('other', { dash: [2, 3] })], [0, 1], 240)
    const [mine, other] = data.datasets
    const radii = mine.pointRadius as number[]
    expect(radii).toHaveLength(241)
    expect(radii.filter((r) => r > 0)).toHaveLength(12)
    expect(mine.pointStyle).toBe('rectRot')
    expect(mine.borderDash).toEqual([])
    expect(other.pointRadius).toBe(0)
    expect(other.borderDash).toEqual([2, 3])
  })
})
