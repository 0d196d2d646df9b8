// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElRadio, ElTag } from 'element-plus'
import { fitAll } from '@shared/stats'
import FitTable from '@/components/reconcile/FitTable.vue'

// Quartiles of N(10, 3.75²)-like judgements (FIT-normal): on the real line normal, Student-t and uniform are fitted.
const fits = fitAll([{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 13, prob: 0.75 }], { kind: 'real' })

function mountTable(chosen: string | null, disabled = false) {
  return mount(FitTable, { props: { fits, chosen: chosen as never, disabled, unit: 'L/s' }, global: { components: { ElRadio, ElTag } } })
}

describe('FitTable', () => {
  it('lists one row per fitted family, best first, and marks the chosen family', () => {
    const wrapper = mountTable('student-t')
    const rows = wrapper.findAll('[data-testid="fit-row"]')
    expect(rows.map((r) => r.attributes('data-family'))).toEqual(fits.map((f) => f.distribution.family))
    expect(rows[0].get('[data-testid="fit-closest-tag"]').text()).toBe('closest')
    expect(wrapper.text()).not.toMatch(/best fit/i)
    const chosen = wrapper.get('[data-testid="fit-row"][data-family="student-t"]')
    expect(chosen.classes()).toContain('is-chosen')
    expect(chosen.attributes('data-chosen')).toBe('true')
    expect(chosen.find('[data-testid="fit-chosen-tag"]').exists()).toBe(true)
    expect((chosen.get('input[type="radio"]').element as HTMLInputElement).checked).toBe(true)
    for (const other of rows.filter((r) => r.attributes('data-family') !== 'student-t')) {
      expect(other.classes()).not.toContain('is-chosen')
      expect((other.get('input[type="radio"]').element as HTMLInputElement).checked).toBe(false)
      expect(other.find('[data-testid="fit-chosen-tag"]').exists()).toBe(false)
    }
  })

  it('emits the family picked, and shows parameters, SSE and implied values right-aligned', async () => {
    const wrapper = mountTable(null)
    expect(wrapper.findAll('.is-chosen')).toHaveLength(0)
    await wrapper.get('[data-testid="fit-row"][data-family="normal"] input[type="radio"]').setValue(true)
    expect(wrapper.emitted('choose')).toEqual([['normal']])
    const cells = wrapper.get('[data-testid="fit-row"][data-family="normal"]').findAll('td.num')
    expect(cells).toHaveLength(4)
    expect(wrapper.get('[data-testid="fit-row"][data-family="normal"]').text()).toContain('μ\u00a0=\u00a010.28')
  })
})
