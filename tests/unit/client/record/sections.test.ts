// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton } from 'element-plus'
import RecordSection from '@/components/record/RecordSection.vue'
import { groupComments, recordSections, SECTION_MAX } from '@/record/sections'
import type { RecordComposition, RecordLinkedSet } from '@/api/record'
import { comment, quantity } from './fixtures'

const content = { quantities: [quantity(), quantity({ name: 'Leak-alert uptake', symbol: 'uptake' })] }

describe('record sections and their comments', () => {
  it('numbers the sections as the .docx does: study, panel, calibration, one per quantity, cautions, review, history', () => {
    expect(recordSections(content).map((s) => `${s.number}. ${s.key}`)).toEqual([
      '1. Study and decision', '2. Expert panel', '3. Calibration questions', '4. Night-flow reduction (flow)', '5. Leak-alert uptake (uptake)',
      '6. Cautions', '7. Review and sign-off', '8. Change history',
    ])
  })

  it('adds the joint priors after the quantities when the record has compositions, numbered as the .docx does', () => {
    const withShares = { ...content, compositions: [{ name: 'Household uptake' } as RecordComposition] }
    const sections = recordSections(withShares)
    expect(sections.map((s) => `${s.number}. ${s.key}`).slice(5)).toEqual(['6. Joint priors', '7. Cautions', '8. Review and sign-off', '9. Change history'])
    expect(groupComments([comment(1, 'Household uptake', 'Why a Dirichlet?')], sections).bySection['Joint priors'].map((c) => c.id)).toEqual([1])
    expect(recordSections({ ...content, compositions: [] }).map((s) => s.key)).not.toContain('Joint priors')
    const linkedOnly = recordSections({ ...content, compositions: [], linkedSets: [{ name: 'joint_bursts_repair' } as RecordLinkedSet] })
    expect(linkedOnly.find((s) => s.kind === 'joint')).toMatchObject({ number: 6, key: 'Joint priors', aliases: ['joint_bursts_repair'] })
  })

  it('keeps section names within what the server accepts', () => {
    const long = recordSections({ quantities: [quantity({ name: 'A very long quantity name '.repeat(5), symbol: 'q' })] })
    expect(long[3].key.length).toBeLessThanOrEqual(SECTION_MAX)
  })

  it('groups comments under their section: by heading, numbered heading, quantity name or symbol; the rest are general', () => {
    const sections = recordSections(content)
    const { bySection, other } = groupComments([
      comment(3, 'Night-flow reduction', 'Why equal weights?', 'return'),
      comment(1, 'Night-flow reduction (flow)', 'Cite the pilot report.'),
      comment(2, '4. Night-flow reduction (flow)', 'Numbered heading.'),
      comment(4, 'uptake', 'By symbol.'),
      comment(5, 'Expert panel', 'Interests?'),
      comment(6, 'General', 'Overall fine.'),
      comment(7, 'A quantity that was removed', 'Stale.'),
    ], sections)
    expect(bySection['Night-flow reduction (flow)'].map((c) => c.id)).toEqual([1, 2, 3])
    expect(bySection['Leak-alert uptake (uptake)'].map((c) => c.body)).toEqual(['By symbol.'])
    expect(bySection['Expert panel']).toHaveLength(1)
    expect(other.map((c) => c.id)).toEqual([6, 7])
    expect(bySection['Study and decision']).toBeUndefined()
  })

  it('renders a section with its data-section, its comments and, when allowed, a comment button', async () => {
    const comments = [comment(1, 'Expert panel', 'State how interests were managed.'), comment(2, 'Expert panel', 'Explain the weights.', 'return')]
    const w = mount(RecordSection, {
      props: { sectionKey: 'Expert panel', number: 2, comments, canComment: true },
      slots: { default: '<p>Panel table</p>' },
      global: { components: { ElButton } },
    })
    const section = w.get('[data-testid="record-section"]')
    expect(section.attributes('data-section')).toBe('Expert panel')
    expect(w.get('h2').text()).toBe('2. Expert panel')
    const items = w.findAll('[data-testid="comment-item"]')
    expect(items.map((i) => i.attributes('data-kind'))).toEqual(['comment', 'return'])
    expect(items[1].text()).toContain('returned the record')
    await w.get('[data-testid="comment-open"]').trigger('click')
    expect(w.emitted('comment')).toEqual([['Expert panel']])

    await w.setProps({ canComment: false })
    expect(w.find('[data-testid="comment-open"]').exists()).toBe(false)
  })
})
