// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount, flushPromises } from '@vue/test-utils'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { StudySummary } from '@shared/types'
import StudyNav from '@/components/StudyNav.vue'
import { routes } from '@/router/routes'

function study(myRole: StudySummary['myRole']): StudySummary {
  return {
    id: 1, title: 'Kestrel', context: 'ctx', status: 'framing', ownerId: 2, ownerName: 'Ana', myRole,
    quantityCount: 3, memberCount: 5, version: 1, createdAt: '', updatedAt: '',
  }
}

async function navIds(myRole: StudySummary['myRole']): Promise<string[]> {
  const router = createRouter({ history: createMemoryHistory(), routes })
  const wrapper = mount(StudyNav, { props: { study: study(myRole) }, global: { plugins: [router] } })
  await flushPromises()
  return wrapper.findAll('[data-testid^="nav-"]').map((a) => a.attributes('data-testid')!)
}

describe('StudyNav', () => {
  it('resolves the study pages by name', () => {
    const router = createRouter({ history: createMemoryHistory(), routes })
    for (const [path, name] of [
      ['/studies/1/quantities', 'study-quantities'],
      ['/studies/1/calibration', 'study-calibration'],
      ['/studies/1/audit', 'study-audit'],
      ['/studies/1/outbox', 'study-outbox'],
    ]) {
      const resolved = router.resolve(path!)
      expect(resolved.name).toBe(name)
      expect(resolved.meta.roles).toBeUndefined() // members are not blocked; the API decides
    }
  })

  it('shows each page only to the study roles that can use it', async () => {
    const analyst = await navIds('analyst')
    expect(analyst).toEqual(expect.arrayContaining(['nav-quantities', 'nav-calibration', 'nav-audit', 'nav-outbox']))
    expect(await navIds('admin')).toEqual(analyst)

    const reviewer = await navIds('reviewer')
    expect(reviewer).toEqual(expect.arrayContaining(['nav-quantities', 'nav-calibration', 'nav-audit']))
    expect(reviewer).not.toContain('nav-outbox')

    const expert = await navIds('expert')
    expect(expert).toEqual(expect.arrayContaining(['nav-quantities', 'nav-calibration']))
    expect(expert).not.toContain('nav-audit')
    expect(expert).not.toContain('nav-outbox')
  })
})
