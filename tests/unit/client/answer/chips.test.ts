// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton, ElIcon } from 'element-plus'
import { applyChip, chipKeyAction, chipScale, chipsLeft, niceStep, visibleEdgeLabels } from '@/answer/chips'
import { emptyDraft, readDraft } from '@/answer/draft'
import ChipGrid from '@/components/answer/ChipGrid.vue'

describe('chip grid keyboard', () => {
  it('moves between bins with the arrows, Home and End, staying inside the grid', () => {
    expect(chipKeyAction('ArrowRight', 2, 8)).toEqual({ type: 'focus', index: 3 })
    expect(chipKeyAction('ArrowRight', 7, 8)).toEqual({ type: 'focus', index: 7 })
    expect(chipKeyAction('ArrowLeft', 0, 8)).toEqual({ type: 'focus', index: 0 })
    expect(chipKeyAction('Home', 5, 8)).toEqual({ type: 'focus', index: 0 })
    expect(chipKeyAction('End', 1, 8)).toEqual({ type: 'focus', index: 7 })
  })

  it('adds with ↑, + and Enter/Space; removes with ↓, − and Delete; leaves Tab alone', () => {
    for (const key of ['ArrowUp', '+', '=', 'Enter', ' ']) expect(chipKeyAction(key, 4, 8)).toEqual({ type: 'add', index: 4 })
    for (const key of ['ArrowDown', '-', 'Delete', 'Backspace']) expect(chipKeyAction(key, 4, 8)).toEqual({ type: 'remove', index: 4 })
    expect(chipKeyAction('Tab', 4, 8)).toBeNull()
    expect(chipKeyAction('a', 4, 8)).toBeNull()
  })

  it('never places more chips than the round has, nor takes from an empty bin', () => {
    expect(applyChip([1, 2, 0], 5, { type: 'add', index: 2 })).toEqual([1, 2, 1])
    expect(applyChip([3, 2, 0], 5, { type: 'add', index: 2 })).toEqual([3, 2, 0])
    expect(applyChip([3, 2, 0], 5, { type: 'remove', index: 2 })).toEqual([3, 2, 0])
    expect(applyChip([3, 2, 0], 5, { type: 'remove', index: 0 })).toEqual([2, 2, 0])
    expect(chipsLeft([3, 2, 0], 5)).toBe(0)
    expect(chipsLeft([1, 0, 0], 5)).toBe(4)
  })
})

describe('chip grid drawn to scale', () => {
  // Constructed example: bins [0, 1), [1, 3), [3, 7) with 2, 2 and 4 chips are 2, 1 and 1 chips per unit.
  it('places each column by its bin on the value axis and makes it as high as its chips per unit', () => {
    const s = chipScale([0, 1, 3, 7], [2, 2, 4])
    expect(s.columns.map((c) => [c.left, c.width])).toEqual([[0, 1 / 7], [1 / 7, 2 / 7], [3 / 7, 4 / 7]])
    expect(s.columns.map((c) => c.perUnit)).toEqual([2, 1, 1])
    expect(s.top).toBe(2)
    expect(s.columns.map((c) => c.height)).toEqual([1, 0.5, 0.5])
    // Every chip has the same area: width × height of one chip is the same in every bin.
    const areas = s.columns.map((c) => c.width * c.chip)
    for (const a of areas) expect(a).toBeCloseTo(areas[0], 12)
  })

  it('raises the top to hold the fitted curve and rounds it to a tick', () => {
    const s = chipScale([0, 1, 3, 7], [2, 2, 4], 2.6)
    expect(s.top).toBe(3)
    expect(s.ticks).toEqual([1, 2, 3])
    expect(s.columns[0].height).toBeCloseTo(2 / 3, 12)
  })

  it('keeps a scale for an empty grid', () => {
    const s = chipScale([0, 5, 10], [0, 0])
    expect(s.top).toBeGreaterThan(0)
    expect(s.columns.every((c) => c.height === 0)).toBe(true)
  })

  it('chooses 1, 2 or 5 times a power of ten for the ticks (common practice)', () => {
    expect(niceStep(3)).toBe(1)
    expect(niceStep(0.45)).toBeCloseTo(0.2, 12)
    expect(niceStep(12)).toBe(5)
    expect(niceStep(250)).toBe(100)
  })

  it('leaves out edge labels that would overlap, keeping the first and the last', () => {
    const edges = [0, 1, 2, 3, 5, 7, 10, 14, 21, 30, 60]
    const labels = edges.map(String)
    const shown = visibleEdgeLabels(edges.map((e) => e / 60), labels, 300)
    expect(shown[0]).toBe(true)
    expect(shown[10]).toBe(true)
    const kept = edges.filter((_, i) => shown[i])
    for (let i = 1; i < kept.length; i++) expect(((kept[i] - kept[i - 1]) / 60) * 300).toBeGreaterThanOrEqual(13)
    expect(visibleEdgeLabels(edges.map((e) => e / 60), labels, 3000).every(Boolean)).toBe(true)
  })
})

describe('ChipGrid', () => {
  const item = { method: 'chip-grid' as const, edges: [0, 2, 4, 6], chips: 4 }
  function mountGrid(chips: number[]) {
    const draft = { ...emptyDraft(item), chips }
    return mount(ChipGrid, {
      attachTo: document.body,
      props: { item, unit: 'L/s', draft, reading: readDraft(item, draft, { kind: 'real' }), readOnly: false },
      global: { components: { ElButton, ElIcon } },
    })
  }

  it('shows one bin per interval with its count, and the chips left', () => {
    const w = mountGrid([1, 2, 0])
    expect(w.findAll('[data-testid="chip-bin"]').map((b) => b.attributes('data-count'))).toEqual(['1', '2', '0'])
    expect(w.get('[data-testid="chips-left"]').text()).toBe('Chips left: 1 of 4')
    expect(w.findAll('[data-testid="chip-column"]')[1].findAll('.chips__chip')).toHaveLength(2)
    w.unmount()
  })

  it('adds and removes chips from the keyboard and by clicking', async () => {
    const w = mountGrid([1, 2, 0])
    const bins = w.findAll('[data-testid="chip-bin"]')
    expect(bins.map((b) => b.attributes('tabindex'))).toEqual(['0', '-1', '-1'])
    await bins[0].trigger('keydown', { key: 'ArrowRight' })
    expect(w.findAll('[data-testid="chip-bin"]').map((b) => b.attributes('tabindex'))).toEqual(['-1', '0', '-1'])
    await bins[1].trigger('keydown', { key: 'ArrowUp' })
    await bins[1].trigger('keydown', { key: '-' })
    await bins[2].trigger('click')
    await w.findAll('[data-testid="chip-remove"]')[0].trigger('click')
    expect(w.emitted('chips')).toEqual([[[1, 3, 0]], [[1, 1, 0]], [[1, 2, 1]], [[0, 2, 0]]])
    w.unmount()
  })

  it('adds nothing when every chip is placed', async () => {
    const w = mountGrid([2, 2, 0])
    await w.findAll('[data-testid="chip-bin"]')[2].trigger('keydown', { key: 'ArrowUp' })
    expect(w.emitted('chips')).toBeUndefined()
    expect(w.get('[data-testid="chips-left"]').text()).toBe('All 4 chips placed')
    w.unmount()
  })
})
