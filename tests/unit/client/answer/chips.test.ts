// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton, ElIcon } from 'element-plus'
import { applyChip, chipKeyAction, chipsLeft } from '@/answer/chips'
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
    expect(w.findAll('[data-testid="chip-bin"]')[1].findAll('.chips__chip')).toHaveLength(2)
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
