import { createRequire } from 'node:module'
import type { Page } from 'playwright-core'
import { expect } from 'vitest'

/** axe-core's browser build, read from node_modules (never from a CDN). */
const AXE_SCRIPT = createRequire(import.meta.url).resolve('axe-core/axe.min.js')
/** A same-origin address the page fetches axe from (the app's CSP allows scripts from its own origin only). */
const AXE_PATH = '/__test__/axe.min.js'

export interface AxeViolation {
  id: string
  impact: string
  help: string
  /** CSS selectors of the offending elements (the first few). */
  targets: string[]
}

/** Runs axe-core in the page (WCAG 2.x A and AA rules and axe's best practices) and returns its violations. */
export async function runAxe(page: Page): Promise<AxeViolation[]> {
  if (!(await page.evaluate(() => 'axe' in window))) {
    await page.route(`**${AXE_PATH}`, (route) => route.fulfill({ path: AXE_SCRIPT, contentType: 'text/javascript' }))
    await page.addScriptTag({ url: AXE_PATH })
  }
  return page.evaluate(async () => {
    type Result = { violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] }[] }
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<Result> } }).axe
    const result = await axe.run(document, { resultTypes: ['violations'] })
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact ?? 'unknown',
      help: v.help,
      targets: v.nodes.slice(0, 5).map((n) => n.target.map(String).join(' ')),
    }))
  })
}

/** How many violations of each impact axe found, on one line. */
export function axeFigure(screen: string, violations: AxeViolation[]): string {
  const count = (impact: string) => violations.filter((v) => v.impact === impact).length
  return `axe ${screen}: critical ${count('critical')}, serious ${count('serious')}, moderate ${count('moderate')}, minor ${count('minor')}`
}

/** Fails when axe finds a serious or critical violation on the page; prints the figures for `screen`. */
export async function expectAccessible(page: Page, screen: string): Promise<AxeViolation[]> {
  const violations = await runAxe(page)
  console.log(axeFigure(screen, violations))
  const grave = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical')
  expect.soft(grave.map((v) => `${screen}: ${v.impact} ${v.id} (${v.help}) at ${v.targets.join(' | ')}`)).toEqual([])
  return violations
}
