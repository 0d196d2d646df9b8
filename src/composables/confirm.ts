import { ElMessageBox } from 'element-plus'
// The stylesheets behind 'element-plus/es/components/message-box/style/css' (see notify.ts).
import 'element-plus/theme-chalk/el-button.css'
import 'element-plus/theme-chalk/el-input.css'
import 'element-plus/theme-chalk/el-overlay.css'
import 'element-plus/theme-chalk/el-message-box.css'

export interface ConfirmOptions {
  title: string
  message: string
  confirmLabel: string
  /** The other choice's words (default "Cancel"). */
  cancelLabel?: string
  tone?: 'warning' | 'info'
}

/** Asks for confirmation; resolves true when confirmed, false when cancelled or closed. */
export async function confirmAction(options: ConfirmOptions): Promise<boolean> {
  try {
    await ElMessageBox.confirm(options.message, options.title, {
      confirmButtonText: options.confirmLabel,
      cancelButtonText: options.cancelLabel ?? 'Cancel',
      type: options.tone ?? 'warning',
      autofocus: true,
    })
    return true
  } catch {
    return false
  }
}
