import { ElMessage } from 'element-plus'
// The stylesheets behind 'element-plus/es/components/message/style/css', imported directly so
// this module also loads under vitest (which cannot import CSS from inside node_modules).
import 'element-plus/theme-chalk/el-badge.css'
import 'element-plus/theme-chalk/el-message.css'

/** Short-lived confirmation and error messages (ElMessage has role="alert"). */
export const notify = {
  success(message: string): void {
    ElMessage({ type: 'success', message, showClose: true, duration: 4000 })
  },
  error(message: string): void {
    ElMessage({ type: 'error', message, showClose: true, duration: 8000 })
  },
}
