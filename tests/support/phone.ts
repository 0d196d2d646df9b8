import type { Page } from 'playwright-core'
import { expect } from 'vitest'

/** Smallest tap target, in CSS pixels (WCAG 2.2, success criterion 2.5.5 "Target Size (Enhanced)"). */
export const MIN_TARGET = 44

/** Phone screens the expert pages are checked at (CSS pixels). */
export const PHONES = [
  { name: '360x740', width: 360, height: 740 },
  { name: '390x844', width: 390, height: 844 },
] as const

/**
 * What breaks a phone layout on the page as it stands: a page wider than the screen (sideways scrolling), and any
 * visible button or button-like control that is smaller than 44 × 44 px or reaches outside the screen's width.
 */
export async function phoneLayoutProblems(page: Page): Promise<string[]> {
  return page.evaluate((min: number) => {
    const problems: string[] = []
    const width = document.documentElement.clientWidth
    const scroll = document.documentElement.scrollWidth
    if (scroll > width) problems.push(`the page is ${scroll} px wide on a ${width} px screen`)
    const controls = document.querySelectorAll<HTMLElement>('button, [role="button"], [role="spinbutton"], a.el-button, summary')
    for (const el of controls) {
      if (!el.checkVisibility({ checkOpacity: true, checkVisibilityCSS: true })) continue
      if (el.closest('.visually-hidden')) continue
      const r = el.getBoundingClientRect()
      if (r.width === 0 || r.height === 0) continue
      const name = `${el.tagName.toLowerCase()} "${(el.getAttribute('aria-label') ?? el.textContent ?? '').trim().replace(/\s+/g, ' ').slice(0, 40)}"`
      if (r.left < -0.5 || r.right > width + 0.5) problems.push(`${name} reaches outside the screen (${Math.round(r.left)} to ${Math.round(r.right)} px)`)
      if (r.width < min - 0.5 || r.height < min - 0.5) problems.push(`${name} is ${Math.round(r.width)} × ${Math.round(r.height)} px`)
    }
    return problems
  }, MIN_TARGET)
}

/** Fails with the list of problems when the page does not fit the phone screen (see phoneLayoutProblems). */
export async function expectPhoneLayout(page: Page, screen: string): Promise<void> {
  const problems = await phoneLayoutProblems(page)
  expect.soft(problems.map((p) => `${screen}: ${p}`)).toEqual([])
}
