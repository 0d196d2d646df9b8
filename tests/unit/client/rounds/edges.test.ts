import { describe, expect, it } from 'vitest'
import { roundItemSchema } from '@shared/schemas/rounds'
import { formatEdges, intervalLabels, parseEdges, suggestEdges, supportLabel } from '@/rounds/edges'

describe('interval edges editor: parsing', () => {
  it('reads numbers separated by commas, semicolons or spaces', () => {
    expect(parseEdges('0, 5, 10, 20')).toEqual({ ok: true, edges: [0, 5, 10, 20] })
    expect(parseEdges(' 0;0.25 ;  .5 1 ')).toEqual({ ok: true, edges: [0, 0.25, 0.5, 1] })
    expect(parseEdges('-3, -1.5e0, 2E1')).toEqual({ ok: true, edges: [-3, -1.5, 20] })
  })

  it('rejects what is not a number and names it', () => {
    expect(parseEdges('0, 5, ten')).toEqual({ ok: false, message: '“ten” is not a number; separate the edges with commas' })
    expect(parseEdges('0, 5x, 10')).toMatchObject({ ok: false })
    expect(parseEdges('0, Infinity, 10')).toMatchObject({ ok: false })
    expect(parseEdges('0x10, 20, 30')).toMatchObject({ ok: false })
  })

  it('asks for the edges, at least 3 of them and at most 31', () => {
    expect(parseEdges('   ')).toEqual({ ok: false, message: 'Enter the interval edges' })
    expect(parseEdges('0, 1')).toEqual({ ok: false, message: 'Give at least 3 edges (2 intervals)' })
    const many = Array.from({ length: 32 }, (_, i) => i).join(', ')
    expect(parseEdges(many)).toEqual({ ok: false, message: 'Use at most 30 intervals' })
    expect(parseEdges(Array.from({ length: 31 }, (_, i) => i).join(','))).toMatchObject({ ok: true })
  })

  it('rejects edges that do not strictly increase (ties included)', () => {
    expect(parseEdges('0, 5, 3')).toEqual({ ok: false, message: 'Interval edges must be strictly increasing' })
    expect(parseEdges('0, 5, 5, 10')).toEqual({ ok: false, message: 'Interval edges must be strictly increasing' })
  })

  it("checks the quantity's support with the server's wording", () => {
    expect(parseEdges('0, 0.5, 1.5', { kind: 'proportion' })).toEqual({
      ok: false,
      message: "Interval edges must lie within the quantity's support [0, 1]",
    })
    expect(parseEdges('-1, 0, 1', { kind: 'positive' })).toEqual({
      ok: false,
      message: "Interval edges must lie within the quantity's support [0, ∞]",
    })
    expect(parseEdges('2, 5, 9', { kind: 'bounded', lower: 2, upper: 9 })).toMatchObject({ ok: true })
    expect(parseEdges('-100, 0, 100', { kind: 'real' })).toMatchObject({ ok: true })
  })

  it('agrees with the shared schema on every edge list it accepts', async () => {
    for (const text of ['0, 1, 2', '0, 0.1, 0.2, 0.4, 1', '-5, 0, 5, 10']) {
      const parsed = parseEdges(text)
      if (!parsed.ok) throw new Error(text)
      await expect(roundItemSchema.validate({ quantityId: 1, method: 'fixed-interval', edges: parsed.edges })).resolves.toBeTruthy()
    }
  })
})

describe('interval edges editor: display and suggestions', () => {
  it('formats edges back to the text the editor shows', () => {
    expect(formatEdges([0, 0.1, 2])).toBe('0, 0.1, 2')
    expect(formatEdges(undefined)).toBe('')
  })

  it('labels the intervals, the last one closed', () => {
    expect(intervalLabels([0, 5, 10])).toEqual(['0 to under 5', '5 to 10'])
    expect(intervalLabels([-2, 0, 1.5])).toEqual(['-2 to under 0', '0 to 1.5'])
    expect(intervalLabels([0, 0.1, 0.25], { kind: 'proportion' })).toEqual(['0 % to under 10 %', '10 % to 25 %'])
  })

  it('suggests a grid only when the support fixes both ends', () => {
    expect(suggestEdges({ kind: 'proportion' })).toEqual([0, 0.1, 0.2, 0.4, 0.6, 0.8, 1])
    expect(suggestEdges({ kind: 'bounded', lower: 0, upper: 1.5 })).toEqual([0, 0.3, 0.6, 0.9, 1.2, 1.5])
    expect(suggestEdges({ kind: 'positive' })).toBeUndefined()
    expect(suggestEdges({ kind: 'real' })).toBeUndefined()
  })

  it('describes the support in words', () => {
    expect(supportLabel({ kind: 'positive' })).toBe('any value above 0')
    expect(supportLabel({ kind: 'proportion' })).toBe('a share from 0 to 1 (0 % to 100 %)')
    expect(supportLabel({ kind: 'bounded', lower: 2, upper: 9 })).toBe('from 2 to 9')
    expect(supportLabel({ kind: 'real' })).toBe('any value, negative or positive')
  })
})
