import { ElMessage, type MessageOptions } from 'element-plus'
// The stylesheets behind 'element-plus/es/components/message/style/css', imported directly so
// this module also loads under vitest (which cannot import CSS from inside node_modules).
import 'element-plus/theme-chalk/el-badge.css'
import 'element-plus/theme-chalk/el-message.css'

/** The page header (AppShell) that messages must not cover. */
export const APP_HEADER_ID = 'app-header'

/** Space between the header's lower edge (or the top of the window) and a message. */
const GAP_PX = 8

/** How long a message stays: long enough to read one sentence, short enough not to pile up. */
export const TOAST_DURATION_MS = { success: 2500, error: 5000 } as const

/**
 * Distance from the top of the window for a message: just below the page header while the header is on screen,
 * near the top once it has scrolled away (the header scrolls with the page and wraps to two rows on a phone).
 */
export function toastOffset(): number {
  const header = typeof document === 'undefined' ? null : document.getElementById(APP_HEADER_ID)
  const bottom = header ? Math.max(0, header.getBoundingClientRect().bottom) : 0
  return Math.round(bottom) + GAP_PX
}

/** Every message of the app goes through here: below the header, brief, and the same text shown once (grouped). */
function show(type: 'success' | 'error', message: string): void {
  const options: MessageOptions = { type, message, showClose: true, duration: TOAST_DURATION_MS[type], offset: toastOffset(), grouping: true }
  ElMessage(options)
}

/** Short-lived confirmation and error messages (ElMessage has role="alert"). */
export const notify = {
  success(message: string): void {
    show('success', message)
  },
  error(message: string): void {
    show('error', message)
  },
}
