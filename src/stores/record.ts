import { computed, ref } from 'vue'
import { defineStore } from 'pinia'
import { recordApi, type RecordSubmission, type RecordView } from '@/api/record'

/** The prior record of one study at a time: the version on screen as the server last sent it. */
export const useRecordStore = defineStore('record', () => {
  const studyId = ref<number | null>(null)
  const view = ref<RecordView | null>(null)
  /** Version asked for; null: the latest. */
  const selectedVersion = ref<number | null>(null)
  /** Charts sent this page load, by study, version, content hash and symbol: sent again only when the draft changed. */
  const chartsSent = new Set<string>()

  const latestVersion = computed(() => view.value?.versions[0]?.version ?? null)
  /** True when the version on screen is the study's current one (writes always go to that one). */
  const isLatest = computed(() => view.value !== null && view.value.record.version === latestVersion.value)

  function keep(id: number, result: RecordView): RecordView {
    studyId.value = id
    view.value = result
    return result
  }

  /** GET …/record, for a version or the latest. */
  async function fetch(id: number, version: number | null = null): Promise<RecordView> {
    if (studyId.value !== id) {
      view.value = null
      selectedVersion.value = null
    }
    selectedVersion.value = version
    const result = await recordApi.get(id, version ?? undefined)
    return keep(id, result)
  }

  /** Every write answers with the current version's view; the page then shows that version. */
  async function write(id: number, task: Promise<RecordView>): Promise<RecordView> {
    const result = await task
    selectedVersion.value = null
    return keep(id, result)
  }

  const setShowNames = (id: number, showNames: boolean) => write(id, recordApi.setShowNames(id, showNames))
  /** Charts on their way to the server: a submission waits for them, since a submitted record takes no chart. */
  const chartsInFlight = new Set<Promise<void>>()
  let submitting = false
  async function submit(id: number, body?: RecordSubmission): Promise<RecordView> {
    submitting = true
    try {
      await Promise.allSettled([...chartsInFlight])
      return await write(id, recordApi.submit(id, body))
    } finally {
      submitting = false
    }
  }
  const leaveOut = (id: number, body: { quantityId: number; reason: string }) => write(id, recordApi.leaveOut(id, body))
  const putBack = (id: number, quantityId: number) => write(id, recordApi.putBack(id, quantityId))
  const returnRecord = (id: number, body: { section: string; comment: string }) => write(id, recordApi.returnRecord(id, body))
  const signOff = (id: number) => write(id, recordApi.signOff(id))
  const comment = (id: number, body: { section: string; body: string }) => write(id, recordApi.comment(id, body))
  const newVersion = (id: number) => write(id, recordApi.newVersion(id))

  /** Sends a chart once per page load and content: false when it was already sent. */
  async function sendChart(id: number, symbol: string, png: string): Promise<boolean> {
    const record = view.value?.record
    const key = `${id}:v${record?.version ?? '?'}:${record?.liveHash ?? ''}:${symbol}`
    if (submitting || chartsSent.has(key)) return false
    chartsSent.add(key)
    const sending = recordApi.saveChart(id, { symbol, png })
    chartsInFlight.add(sending)
    try {
      await sending
    } catch (error) {
      chartsSent.delete(key)
      throw error
    } finally {
      chartsInFlight.delete(sending)
    }
    if (view.value && studyId.value === id && !view.value.record.chartsFor.includes(symbol)) view.value.record.chartsFor.push(symbol)
    return true
  }

  function clear(): void {
    studyId.value = null
    view.value = null
    selectedVersion.value = null
  }

  return { studyId, view, selectedVersion, latestVersion, isLatest, fetch, setShowNames, submit, leaveOut, putBack, returnRecord, signOff, comment, newVersion, sendChart, clear }
})
