import { expect } from 'vitest'
import type { Locator, Page } from 'playwright-core'

/**
 * Every row of a panel view (the strips of src/components/reconcile/PanelRanges.vue) lies inside the screen, its
 * 5–95 % bar and median notch inside its track, and the axis ends on round values (read from each tick's value, so a
 * share written in per cent counts too).
 */
export async function expectPanelInView(scope: Page | Locator, width: number, rowCount: number): Promise<void> {
  const panel = await scope.getByTestId('panel-ranges').boundingBox()
  expect(panel!.x).toBeGreaterThanOrEqual(0)
  expect(panel!.x + panel!.width).toBeLessThanOrEqual(width)
  const rows = await scope.getByTestId('panel-row').evaluateAll((els) => els.map((el) => {
    const track = el.getBoundingClientRect()
    const bar = el.querySelector('[data-testid="panel-range"]')!.getBoundingClientRect()
    const median = el.querySelector('[data-testid="panel-median"]')!.getBoundingClientRect()
    return { track: [track.left, track.right], bar: [bar.left, bar.right], median: median.left + median.width / 2 }
  }))
  expect(rows).toHaveLength(rowCount)
  for (const r of rows) {
    expect(r.bar[1] - r.bar[0]).toBeGreaterThan(4)
    expect(r.bar[0]).toBeGreaterThanOrEqual(r.track[0] - 0.5)
    expect(r.bar[1]).toBeLessThanOrEqual(r.track[1] + 0.5)
    expect(r.median).toBeGreaterThan(r.bar[0])
    expect(r.median).toBeLessThan(r.bar[1])
  }
  const ticks = await scope.getByTestId('panel-tick').evaluateAll((els) => els.map((el) => Number(el.getAttribute('data-value'))))
  expect(ticks.length).toBeGreaterThanOrEqual(3)
  const step = ticks[1] - ticks[0]
  for (const t of ticks) expect(Math.abs(t / step - Math.round(t / step))).toBeLessThan(1e-9)
}
