import { ref } from 'vue'
import { defineStore } from 'pinia'
import { configApi } from '@/api/config'

/** Server-side switches the client needs (GET /api/config). */
export const useConfigStore = defineStore('config', () => {
  const devMailbox = ref(false)
  const loaded = ref(false)

  /** Loads once; when the server cannot tell, optional features stay hidden. */
  async function ensureLoaded(): Promise<void> {
    if (loaded.value) return
    try {
      const config = await configApi.get()
      devMailbox.value = config.devMailbox === true
      loaded.value = true
    } catch {
      devMailbox.value = false
    }
  }

  return { devMailbox, loaded, ensureLoaded }
})
