// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { StudySummary } from '@shared/types'
import StudyNav from '@/components/StudyNav.vue'
import { routes } from '@/router/routes'

describe('record page route and navigation', () => {
  it('resolves /studies/:id/record for analysts, reviewers and admins only (the record is not for experts)', () => {
    const router = createRouter({ history: createMemoryHistory(), routes })
    const resolved = router.resolve('/studies/7/record')
    expect(resolved.name).toBe('study-record')
    expect(resolved.meta.roles).toEqual(['admin', 'analyst', 'reviewer'])
  })

  it('shows "Record" in the study navigation to analysts, reviewers and admins, not to experts', async () => {
    for (const myRole of ['admin', 'analyst', 'reviewer', 'expert'] as StudySummary['myRole'][]) {
      const router = createRouter({ history: createMemoryHistory(), routes })
      const study: StudySummary = { id: 7, title: 'Kestrel', context: '', status: 'reconciling', ownerId: 2, ownerName: 'Ana', myRole, quantityCount: 1, memberCount: 3, version: 1, createdAt: '', updatedAt: '' }
      const wrapper = mount(StudyNav, { props: { study }, global: { plugins: [router] } })
      await flushPromises()
      const link = wrapper.find('[data-testid="nav-record"]')
      if (myRole === 'expert') {
        expect(link.exists()).toBe(false)
        continue
      }
      expect(link.text()).toBe('Record')
      expect(link.attributes('href')).toBe('/studies/7/record')
    }
  })
})
