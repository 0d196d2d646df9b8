import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'

const calls: string[] = []
let releaseChart: () => void = () => {}
vi.mock('@/api/record', () => ({
  recordApi: {
    saveChart: vi.fn(() => new Promise<void>((resolve) => { calls.push('chart sent'); releaseChart = () => { calls.push('chart stored'); resolve() } })),
    submit: vi.fn(async () => { calls.push('submit'); return { record: { version: 1, status: 'in_review', chartsFor: [] }, versions: [{ version: 1 }] } }),
  },
}))

const { useRecordStore } = await import('@/stores/record')

describe('record store: charts and submission', () => {
  beforeEach(() => {
    setActivePinia(createPinia())
    calls.length = 0
  })

  it('submits only once a chart already on its way has been stored, so the server never refuses it as late', async () => {
    const store = useRecordStore()
    const chart = store.sendChart(4, 'lambda', 'data:image/png;base64,AAAA')
    const submitted = store.submit(4)
    await Promise.resolve()
    expect(calls).toEqual(['chart sent'])
    releaseChart()
    await chart
    await submitted
    expect(calls).toEqual(['chart sent', 'chart stored', 'submit'])
  })

  it('sends no chart while the record is being submitted', async () => {
    const store = useRecordStore()
    const submitted = store.submit(4)
    await expect(store.sendChart(4, 'lambda', 'data:image/png;base64,AAAA')).resolves.toBe(false)
    await submitted
    expect(calls).toEqual(['submit'])
  })
})
