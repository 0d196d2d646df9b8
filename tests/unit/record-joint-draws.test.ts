import { crc32, inflateSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import { encodePng, scatterPng } from '../../server/export/scatter-png'
import { linkedSetScatters, RECORD_JOINT_DRAWS, scatterAxes } from '../../shared/record/joint-draws'
import { sampleJoint, type Distribution } from '../../shared/stats/index'

const MARGINALS: Distribution[] = [{ family: 'normal', mu: 18, sigma: 4 }, { family: 'lognormal', meanlog: 2, sdlog: 0.3 }, { family: 'gamma', shape: 3, rate: 0.5 }]
const R = [[1, 0.6, 0.2], [0.6, 1, -0.3], [0.2, -0.3, 1]]
const side = (symbol: string) => ({ name: `Quantity ${symbol}`, symbol })

/** The chunks of a PNG: type, data, and whether the stored CRC-32 is that of type and data. */
function chunks(png: Buffer): { type: string; data: Buffer; crcOk: boolean }[] {
  const out = []
  for (let at = 8; at < png.length;) {
    const length = png.readUInt32BE(at)
    const type = png.toString('ascii', at + 4, at + 8)
    const data = png.subarray(at + 8, at + 8 + length)
    out.push({ type, data, crcOk: png.readUInt32BE(at + 8 + length) === crc32(png.subarray(at + 4, at + 8 + length)) })
    at += 12 + length
  }
  return out
}

describe('the scatters of a linked set in the record', () => {
  it('takes each link’s pair of columns from one set of seeded joint draws, first quantity across', () => {
    const set = {
      quantities: ['a', 'b', 'c'].map((s, i) => ({ ...side(s), distribution: MARGINALS[i] })),
      links: [{ first: side('a'), second: side('b') }, { first: side('c'), second: side('b') }],
      jointMatrix: R, draws: { ...RECORD_JOINT_DRAWS },
    }
    const draws = sampleJoint(MARGINALS, R, RECORD_JOINT_DRAWS.n, RECORD_JOINT_DRAWS.seed)
    const [ab, cb] = linkedSetScatters(set)
    expect(ab.points).toEqual(draws.map((r) => [r[0], r[1]]))
    expect(cb.points).toEqual(draws.map((r) => [r[2], r[1]]))
    expect([cb.first.symbol, cb.second.symbol]).toEqual(['c', 'b'])
    expect(linkedSetScatters({ ...set, draws: null })).toEqual([])
  })

  it('frames the middle 99 % of the draws on round axes', () => {
    // 0, 1, …, 1000 across: the 0.5 % and 99.5 % points are 5 and 995, so the frame runs 0 to 1000 by 200 (constructed).
    const points = Array.from({ length: 1001 }, (_, i) => [i, i === 1000 ? 1e6 : i / 1000] as [number, number])
    const axes = scatterAxes(points)
    expect(axes.x).toEqual({ min: 0, max: 1000, step: 200 })
    // The one far draw up at 1e6 lies outside the frame rather than stretching it.
    expect(axes.y).toEqual({ min: 0, max: 1, step: 0.2 })
  })
})

describe('the .docx scatter picture', () => {
  it('encodes an RGB image as a PNG whose chunks carry valid CRCs and whose pixels inflate back unchanged', () => {
    const rgb = Uint8Array.from([255, 0, 0, 0, 255, 0, 0, 0, 255, 10, 20, 30, 40, 50, 60, 70, 80, 90])
    const png = encodePng(3, 2, rgb)
    const parts = chunks(png)
    expect(parts.map((c) => [c.type, c.crcOk])).toEqual([['IHDR', true], ['IDAT', true], ['IEND', true]])
    expect([...parts[0].data]).toEqual([0, 0, 0, 3, 0, 0, 0, 2, 8, 2, 0, 0, 0])
    expect([...inflateSync(parts[1].data)]).toEqual([0, ...rgb.slice(0, 9), 0, ...rgb.slice(9)])
  })

  it('draws the draws inside a white picture with a frame', () => {
    const draws = sampleJoint(MARGINALS.slice(0, 2), [[1, 0.6], [0.6, 1]], 400, 5).map((r) => [r[0], r[1]] as [number, number])
    const png = scatterPng(draws, 360, 240)
    const pixels = inflateSync(chunks(png).find((c) => c.type === 'IDAT')!.data)
    const at = (x: number, y: number) => [...pixels.subarray(y * (360 * 3 + 1) + 1 + x * 3, y * (360 * 3 + 1) + 1 + x * 3 + 3)]
    expect(at(0, 0)).toEqual([255, 255, 255])
    // Pixels tinted by the teal draws (green above red and blue): many, and none in the left margin where the tick numbers go.
    let tinted = 0
    let inMargin = 0
    for (let y = 0; y < 240; y++) for (let x = 0; x < 360; x++) {
      const [r, g, b] = at(x, y)
      if (g > r + 20 && g > b) (x < 70 ? inMargin++ : tinted++)
    }
    expect(tinted).toBeGreaterThan(400)
    expect(inMargin).toBe(0)
  })
})
