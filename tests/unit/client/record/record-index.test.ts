// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import { mount } from '@vue/test-utils'
import RecordIndex from '@/components/record/RecordIndex.vue'
import FoldToggle from '@/components/record/FoldToggle.vue'
import { useFoldedRows } from '@/composables/useFoldedRows'

const sections = [
  { key: 'Study and decision', number: 1 },
  { key: 'Expert panel', number: 2 },
  { key: 'Change history', number: 3 },
]

afterEach(() => {
  document.body.innerHTML = ''
  vi.restoreAllMocks()
})

describe('RecordIndex', () => {
  it('lists every numbered section as a link to its heading', () => {
    const w = mount(RecordIndex, { props: { sections }, attachTo: document.body })
    const links = w.findAll('[data-testid="record-index-link"]')
    expect(links.map((l) => l.text().replace(/\s+/g, ' '))).toEqual(['1. Study and decision', '2. Expert panel', '3. Change history'])
    expect(links.map((l) => l.attributes('href'))).toEqual(['#record-s1', '#record-s2', '#record-s3'])
    expect(w.find('nav').attributes('aria-label')).toBe('Sections of this record')
  })

  it('a click scrolls to the section heading and gives it focus', async () => {
    const heading = document.createElement('h2')
    heading.id = 'record-s2'
    document.body.appendChild(heading)
    const scrolled = vi.fn()
    heading.scrollIntoView = scrolled
    const w = mount(RecordIndex, { props: { sections }, attachTo: document.body })
    await w.findAll('[data-testid="record-index-link"]')[1].trigger('click')
    expect(scrolled).toHaveBeenCalledTimes(1)
    expect(document.activeElement).toBe(heading)
    expect(heading.getAttribute('tabindex')).toBe('-1')
  })
})

describe('folded tables', () => {
  function mountFold(count: number, limit: number) {
    return mount(defineComponent({
      setup() {
        const rows = ref(Array.from({ length: count }, (_, i) => i + 1))
        const fold = useFoldedRows(rows, limit)
        return () => h('div', [
          h('table', { id: 't' }, fold.shown.value.map((r) => h('tr', { 'data-row': r }))),
          h(FoldToggle, { fold, controls: 't', noun: 'events' }),
        ])
      },
    }), { attachTo: document.body })
  }

  it('shows the first rows and a control naming how many more there are; the control unfolds and folds again', async () => {
    const w = mountFold(30, 12)
    expect(w.findAll('tr')).toHaveLength(12)
    const button = w.get('[data-testid="record-fold"]')
    expect(button.text()).toBe('Show all 30 events (18 more)')
    expect(button.attributes('aria-expanded')).toBe('false')
    expect(button.attributes('aria-controls')).toBe('t')
    await button.trigger('click')
    expect(w.findAll('tr')).toHaveLength(30)
    expect(button.attributes('aria-expanded')).toBe('true')
    expect(button.text()).toBe('Show the first events only')
    await button.trigger('click')
    expect(w.findAll('tr')).toHaveLength(12)
  })

  it('a short table has no control and shows every row', () => {
    const w = mountFold(12, 12)
    expect(w.findAll('tr')).toHaveLength(12)
    expect(w.find('[data-testid="record-fold"]').exists()).toBe(false)
  })

  it('prints every row', async () => {
    const w = mountFold(20, 5)
    window.dispatchEvent(new Event('beforeprint'))
    await w.vm.$nextTick()
    expect(w.findAll('tr')).toHaveLength(20)
    window.dispatchEvent(new Event('afterprint'))
    await w.vm.$nextTick()
    expect(w.findAll('tr')).toHaveLength(5)
  })
})
