// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElInput } from 'element-plus'
import { unequalWidths } from '@/rounds/edges'
import EdgesEditor from '@/components/rounds/EdgesEditor.vue'

describe('chip grid bins of unequal width', () => {
  it('tells equal widths (up to the rounding of typed decimals) from unequal ones', () => {
    expect(unequalWidths([0, 1, 2, 3])).toBe(false)
    expect(unequalWidths([0, 0.1, 0.2, 0.3])).toBe(false)
    expect(unequalWidths([0, 1, 2, 3, 5, 7, 10, 14, 21, 30, 60])).toBe(true)
    expect(unequalWidths([0, 1, 2.5])).toBe(true)
  })

  function mountEditor(edges: number[], chipGrid: boolean) {
    return mount(EdgesEditor, { props: { modelValue: edges, support: { kind: 'real' }, unit: 'L/s', chipGrid }, global: { components: { ElInput } } })
  }

  it('warns the analyst in the round form when a chip grid has unequal bins', () => {
    expect(mountEditor([0, 1, 2, 5, 10], true).find('[data-testid="edges-unequal"]').text()).toContain('These bins are not all the same width')
    expect(mountEditor([0, 2, 4, 6], true).find('[data-testid="edges-unequal"]').exists()).toBe(false)
    // Fixed intervals are not drawn as a histogram: no warning.
    expect(mountEditor([0, 1, 2, 5, 10], false).find('[data-testid="edges-unequal"]').exists()).toBe(false)
  })
})
