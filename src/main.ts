import { createApp } from 'vue'
import { createPinia } from 'pinia'
import '@fontsource/open-sans/400.css'
import '@fontsource/open-sans/600.css'
import '@fontsource/open-sans/700.css'
// Element Plus variables first, so the theme below overrides them whatever chunk loads later.
import 'element-plus/theme-chalk/base.css'
import './styles/theme.css'
import './styles/main.css'
import App from './App.vue'
import { createAppRouter, handleExpiredSession } from './router'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
const router = createAppRouter()
handleExpiredSession(router)
app.use(router)

void router.isReady().finally(() => app.mount('#app'))
