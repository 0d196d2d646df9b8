// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { nextTick } from 'vue'
import { ElMessage } from 'element-plus'
import { APP_HEADER_ID, notify } from '@/composables/notify'

/** The messages on show (a closed message is hidden before it is removed). */
const shown = () => [...document.querySelectorAll<HTMLElement>('.el-message')].filter((m) => m.style.display !== 'none')

/** Lets Vue run its leave transitions (animation frames under the fake clock). */
async function settle(): Promise<void> {
  for (let i = 0; i < 3; i++) {
    await nextTick()
    vi.advanceTimersByTime(20)
  }
}

/** A page header whose lower edge is `bottom` px from the top of the window. */
function header(bottom: number): HTMLElement {
  const el = document.createElement('header')
  el.id = APP_HEADER_ID
  el.getBoundingClientRect = () => ({ top: bottom - 59, bottom, left: 0, right: 360, width: 360, height: 59, x: 0, y: bottom - 59, toJSON: () => ({}) })
  document.body.append(el)
  return el
}

beforeEach(() => vi.useFakeTimers())
afterEach(() => {
  ElMessage.closeAll()
  vi.runAllTimers()
  vi.useRealTimers()
  document.body.innerHTML = ''
})

describe('toasts (notify)', () => {
  it('sit just below the page header, and near the top once the header has scrolled away', async () => {
    const bar = header(59)
    notify.success('Quantity saved')
    await nextTick()
    expect(shown().map((m) => m.style.top)).toEqual(['67px'])
    ElMessage.closeAll()
    await settle()
    bar.getBoundingClientRect = () => ({ top: -200, bottom: -141, left: 0, right: 360, width: 360, height: 59, x: 0, y: -200, toJSON: () => ({}) })
    notify.error('Could not save')
    await nextTick()
    expect(shown().map((m) => m.style.top)).toEqual(['8px'])
  })

  it('show the same message once, however often it is raised', async () => {
    header(59)
    for (let i = 0; i < 3; i++) notify.success('Invitation sent')
    notify.success('Round opened')
    await nextTick()
    expect(shown().map((m) => m.querySelector('.el-message__content')?.textContent)).toEqual(['Invitation sent', 'Round opened'])
  })

  it('leave on their own: a confirmation after 2.5 s, an error after 5 s', async () => {
    header(59)
    notify.success('Quantity saved')
    notify.error('Could not save')
    await nextTick()
    expect(shown()).toHaveLength(2)
    vi.advanceTimersByTime(2450)
    await settle()
    expect(shown()).toHaveLength(2)
    vi.advanceTimersByTime(100)
    await settle()
    expect(shown().map((m) => m.querySelector('.el-message__content')?.textContent)).toEqual(['Could not save'])
    vi.advanceTimersByTime(2500)
    await settle()
    expect(shown()).toHaveLength(0)
  })
})
