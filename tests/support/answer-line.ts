import type { Page } from 'playwright-core'

/**
 * Driving the quantile answer's number line from a test: where a value sits on screen (read from two handles' positions
 * and values, as the line draws them to scale), and dragging a handle there with the mouse or a finger.
 */

/** The screen position of a handle's centre. */
export async function handleCentre(page: Page, field: string): Promise<{ x: number; y: number; value: number }> {
  return page.getByTestId(`handle-${field}`).evaluate((el) => {
    const svg = el.closest('svg')!.getBoundingClientRect()
    const [, tx, ty] = /translate\(([-\d.]+)[ ,]+([-\d.]+)\)/.exec(el.getAttribute('transform') ?? '')!
    return { x: svg.left + Number(tx), y: svg.top + Number(ty), value: Number(el.getAttribute('aria-valuenow')) }
  })
}

/** Where `value` lies on the line, from the positions of two handles already on it. */
export async function screenX(page: Page, value: number, [a, b]: [string, string]): Promise<number> {
  const [p, q] = [await handleCentre(page, a), await handleCentre(page, b)]
  return p.x + ((value - p.value) / (q.value - p.value)) * (q.x - p.x)
}

/** Drags a handle to `x` with the mouse, in small moves as a hand does. */
export async function mouseDrag(page: Page, field: string, x: number): Promise<void> {
  const from = await handleCentre(page, field)
  await page.mouse.move(from.x, from.y)
  await page.mouse.down()
  await page.mouse.move(x, from.y + 3, { steps: 8 })
  await page.mouse.up()
}

/** Drags a handle to `x` with one finger (touch events through the DevTools protocol, with touch turned on). */
export async function touchDrag(page: Page, field: string, x: number): Promise<void> {
  const from = await handleCentre(page, field)
  const cdp = await page.context().newCDPSession(page)
  await cdp.send('Emulation.setTouchEmulationEnabled', { enabled: true, maxTouchPoints: 1 })
  const point = (px: number, py: number) => [{ x: Math.round(px), y: Math.round(py), id: 1 }]
  await cdp.send('Input.dispatchTouchEvent', { type: 'touchStart', touchPoints: point(from.x, from.y) })
  for (let i = 1; i <= 8; i++) {
    await cdp.send('Input.dispatchTouchEvent', { type: 'touchMove', touchPoints: point(from.x + ((x - from.x) * i) / 8, from.y + 2) })
  }
  await cdp.send('Input.dispatchTouchEvent', { type: 'touchEnd', touchPoints: [] })
  await cdp.detach()
}
