// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { ref } from 'vue'
import { createPinia, setActivePinia } from 'pinia'
import { fitAnswer } from '@shared/elicitation/answers'
import type { Judgement } from '@/api/judgements'
import { roundCompositions, useAnswerSession, shownFits, sameFit, type QuantityState } from '@/composables/useAnswerSession'
import type { Composition } from '@/api/compositions'
import type { Round } from '@/api/rounds'
import type { LinkAnswer, RoundLink } from '@/api/links'
import { mockFetch, type RecordedCall, type Reply } from '../fetch-mock'

const quantity = (id: number, name: string, support: object) => ({ id, name, symbol: `q${id}`, unit: 'u', question: `${name}?`, support, assumptions: '', evidenceNotes: '', files: [] })
const round = {
  id: 9, studyId: 2, number: 1, title: 'Round', briefing: '', opensAt: '2026-01-01T00:00:00Z', closesAt: '2099-01-01T00:00:00Z', status: 'open',
  reminderHoursBefore: null, reminderSentAt: null, calibrationPosition: 'after', feedbackEnabled: false, askCalibration: true,
  practice: { question: 'Practice', unit: 'km' }, openedAt: null, closedAt: null, version: 1, panel: [], links: [],
  items: [
    { quantityId: 1, method: 'quantile', askTails: false, quantity: quantity(1, 'Burst rate', { kind: 'positive' }) },
    { quantityId: 2, method: 'fixed-interval', edges: [0, 0.5, 1], askTails: false, quantity: quantity(2, 'Uptake', { kind: 'proportion' }) },
  ],
} as unknown as Round

const judgement = (over: Partial<Judgement>): Judgement => ({
  id: 40, roundId: 9, quantityId: 1, expertId: 3, method: 'quantile', answer: { lower: 4, upper: 25, points: [] }, rationale: '', fits: [], chosenFamily: null,
  status: 'draft', version: 1, submittedAt: null, updatedAt: '2026-03-03T09:00:00Z', ...over,
})

let server: { judgements: Judgement[]; put: (c: RecordedCall) => Reply; submit: () => Reply; linkAnswers?: LinkAnswer[]; putLink?: (c: RecordedCall) => Reply }
function setup(answering: Round = round) {
  const mock = mockFetch((c) => {
    if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 't' } }
    if (c.url === '/api/rounds/9/judgements' && c.method === 'GET') return { status: 200, body: server.judgements }
    if (c.url === '/api/studies/2/calibration-questions') return { status: 200, body: [{ id: 7, studyId: 2, question: 'How many bursts in 2024?', unit: 'bursts', position: 1, version: 1 }] }
    if (c.url === '/api/rounds/9/calibration-answers') return { status: 200, body: [] }
    if (c.url === '/api/studies/2/compositions') return { status: 200, body: [] }
    if (c.url.startsWith('/api/rounds/9/judgements/') && c.method === 'PUT') return server.put(c)
    if (c.url === '/api/rounds/9/submit') return server.submit()
    if (c.url === '/api/rounds/9/link-answers' && c.method === 'GET') return { status: 200, body: server.linkAnswers ?? [] }
    if (c.url.startsWith('/api/rounds/9/link-answers/') && c.method === 'PUT') return server.putLink!(c)
  })
  vi.stubGlobal('fetch', mock.fetch)
  setActivePinia(createPinia())
  return { session: useAnswerSession(ref(answering)), calls: mock.calls }
}

describe('the answering session', () => {
  beforeEach(() => {
    vi.useFakeTimers()
    server = { judgements: [judgement({})], put: () => ({ status: 500 }), submit: () => ({ status: 500 }) }
  })
  afterEach(() => {
    vi.useRealTimers()
    vi.unstubAllGlobals()
  })

  it('loads the saved draft, saves changes with the version, and keeps the server’s fits for the saved input', async () => {
    const { session, calls } = setup()
    await session.load()
    const burst = session.quantities.value[0]
    expect(burst.data.draft.texts.lower).toBe('4')
    expect(burst.status.value).toBe('in-progress')
    server.put = (c) => {
      const body = c.body as { points: { value: number; prob: number }[]; lower: number; upper: number }
      const local = fitAnswer({ method: 'quantile' }, { lower: body.lower, upper: body.upper, points: body.points }, { kind: 'positive' })
      // The server's engine (another JavaScript engine) may differ in the last digits.
      const fits = local.fits.map((f, i) => (i === 0 ? { ...f, sse: f.sse * (1 + 1e-12) } : f))
      return { status: 200, body: { judgement: judgement({ version: 2, answer: body, fits }), fits, complete: true, fitMessage: null } }
    }
    session.edit(burst, (d) => Object.assign(d.texts, { median: '10', q1: '8', q3: '13' }))
    await vi.advanceTimersByTimeAsync(800)
    const put = calls.find((c) => c.method === 'PUT')!
    expect(put.url).toBe('/api/rounds/9/judgements/1')
    expect(put.body).toMatchObject({ method: 'quantile', lower: 4, upper: 25, version: 1, points: [{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 13, prob: 0.75 }] })
    expect(burst.data.version).toBe(2)
    const reading = burst.reading.value
    const shown = shownFits(reading.result.fits, burst.data.serverFits, true)
    expect(shown.source).toBe('server')
    expect(shown.differs).toBe(false)
    expect(shown.fits[0].sse).toBe(burst.data.serverFits![0].sse)
  })

  it('on 409 stops saving, then reloads the saved answer and lists what was typed', async () => {
    const { session, calls } = setup()
    await session.load()
    const burst = session.quantities.value[0]
    server.put = () => ({ status: 409, body: { error: { message: 'This answer was saved from another window or device since you loaded it; reload to continue from the newer version' } } })
    session.edit(burst, (d) => (d.texts.median = '9'))
    await vi.advanceTimersByTimeAsync(800)
    expect(burst.autosave.status.value.state).toBe('conflict')
    expect(burst.data.conflict?.reloaded).toBe(false)
    session.edit(burst, (d) => (d.texts.median = '11'))
    expect(burst.data.draft.texts.median).toBe('9')
    server.judgements = [judgement({ version: 3, answer: { lower: 5, upper: 30, points: [{ value: 12, prob: 0.5 }] } })]
    await session.reloadQuantity(burst)
    expect(burst.data.conflict).toMatchObject({ reloaded: true, typed: ['Plausible lower bound: 4', 'Plausible upper bound: 25', 'Median (50 %): 9'] })
    expect(burst.data.draft.texts).toMatchObject({ lower: '5', upper: '30', median: '12' })
    expect(burst.data.version).toBe(3)
    server.put = () => ({ status: 200, body: { judgement: judgement({ version: 4 }), fits: [], complete: false, fitMessage: null } })
    session.edit(burst, (d) => (d.texts.median = '13'))
    await vi.advanceTimersByTimeAsync(800)
    expect(calls.filter((c) => c.method === 'PUT').at(-1)?.body).toMatchObject({ version: 3, points: [{ value: 13, prob: 0.5 }] })
  })

  it('orders the rail with the calibration block and maps the submit’s field errors onto it', async () => {
    const { session } = setup()
    await session.load()
    expect(session.railItems.value.map((i) => [i.key, i.status])).toEqual([['q-1', 'in-progress'], ['q-2', 'not-started'], ['calibration', 'not-started']])
    server.submit = () => ({
      status: 400,
      body: { error: { message: 'Some answers are not complete yet', fields: { 'quantity.1': 'Burst rate: complete your answer', 'calibration.7': 'Calibration question 1: give your 5 %, 50 % and 95 % values' } } },
    })
    expect(await session.submit()).toBe(false)
    expect(session.railItems.value.map((i) => i.problem)).toEqual(['Burst rate: complete your answer', null, 'Calibration question 1: give your 5 %, 50 % and 95 % values'])
    expect(session.submitError.value).toBe('Some answers are not complete yet')
  })

  it('freezes everything once submitted', async () => {
    server.judgements = [judgement({ status: 'submitted', submittedAt: '2026-03-03T10:00:00Z' })]
    const { session, calls } = setup()
    await session.load()
    expect(session.readOnly.value).toBe(true)
    session.edit(session.quantities.value[0], (d) => (d.texts.lower = '1'))
    await vi.advanceTimersByTimeAsync(2000)
    expect(session.quantities.value[0].data.draft.texts.lower).toBe('4')
    expect(calls.some((c) => c.method === 'PUT')).toBe(false)
  })

  it('tells fits apart by family and parameters, not by key order', () => {
    const a = { distribution: { family: 'beta', alpha: 2.42071034714, beta: 7.2110700692 }, sse: 0.0036 } as const
    const reordered = JSON.parse('{"sse":0.0036,"distribution":{"beta":7.2110700692,"alpha":2.42071034714,"family":"beta"}}')
    expect(sameFit(a, reordered)).toBe(true)
    expect(sameFit(a, { ...a, sse: 0.0036000001 })).toBe(false)
    expect(sameFit(a, { ...a, sse: 0.0036000001 }, 1e-4)).toBe(true)
    expect(shownFits([a], [reordered], true).source).toBe('browser')
    expect(shownFits([a], [{ distribution: { family: 'uniform', lower: 0, upper: 1 }, sse: 0.01 }], false).source).toBe('browser')
    expect(shownFits([a], [{ distribution: { family: 'uniform', lower: 0, upper: 1 }, sse: 0.01 }], true)).toMatchObject({ source: 'server', differs: true })
  })
})

describe('links on the answering screen', () => {
  const link: RoundLink = {
    id: 31, roundId: 9, first: { quantityId: 1, name: 'Burst rate', symbol: 'q1' }, second: { quantityId: 2, name: 'Uptake', symbol: 'q2' },
    wording: 'Suppose burst rate turned out above your middle value. How likely is it that uptake is also above yours?', position: 1, version: 1, createdAt: '', updatedAt: '',
  }
  const linked = {
    ...round, links: [link],
    items: [round.items[0], { quantityId: 2, method: 'quantile', askTails: false, quantity: quantity(2, 'Uptake', { kind: 'proportion' }) }],
  } as Round
  const answer = (over: Partial<LinkAnswer>): LinkAnswer => ({
    id: 5, linkId: 31, expertId: 3, probability: null, rationale: '', status: 'draft', version: 1, submittedAt: null, updatedAt: '2026-03-03T09:00:00Z', ...over,
  })
  beforeEach(() => {
    vi.useFakeTimers()
    server = { judgements: [judgement({})], put: () => ({ status: 500 }), submit: () => ({ status: 500 }), linkAnswers: [answer({ rationale: 'Frost' })] }
  })
  afterEach(() => {
    vi.useRealTimers()
    vi.unstubAllGlobals()
  })

  it('puts each link after the quantities and before the calibration block, waits for both fits, and autosaves the chance with its version', async () => {
    const { session, calls } = setup(linked)
    await session.load()
    expect(session.railItems.value.map((i) => [i.key, i.kind, i.title, i.status])).toEqual([
      ['q-1', 'quantity', 'Burst rate', 'in-progress'], ['q-2', 'quantity', 'Uptake', 'not-started'],
      ['l-31', 'link', 'Burst rate and Uptake', 'in-progress'], ['calibration', 'calibration', 'Calibration questions', 'not-started'],
    ])
    const state = session.links.value[0]
    expect(state.data).toMatchObject({ probability: null, rationale: 'Frost', version: 1 })
    // No fitted distribution for either quantity yet: no marginals to draw from.
    expect(state.marginals.value).toBeNull()
    session.edit(session.quantities.value[0], (d) => Object.assign(d.texts, { median: '10', q1: '8', q3: '13' }))
    expect(state.marginals.value).toBeNull()
    session.edit(session.quantities.value[1], (d) => Object.assign(d.texts, { lower: '0.1', upper: '0.9', median: '0.4', q1: '0.3', q3: '0.5' }))
    expect(state.marginals.value?.map((m) => m.family)).toHaveLength(2)

    server.putLink = (c) => ({ status: 200, body: answer({ ...(c.body as object), version: 2 }) })
    session.editLink(state, (d) => (d.probability = 0.7))
    await vi.advanceTimersByTimeAsync(800)
    const put = calls.find((c) => c.url === '/api/rounds/9/link-answers/31')!
    expect(put.body).toEqual({ probability: 0.7, rationale: 'Frost', version: 1 })
    expect(state.data.version).toBe(2)
    expect(session.railItems.value[2].status).toBe('complete')
  })

  it('shows the submit’s message on the link, and stops saving on 409 until the saved answer is reloaded', async () => {
    const { session } = setup(linked)
    await session.load()
    server.submit = () => ({ status: 400, body: { error: { message: 'Some answers are not complete yet', fields: { 'link.31': 'Burst rate and Uptake: say how likely' } } } })
    expect(await session.submit()).toBe(false)
    expect(session.railItems.value.map((i) => i.problem)).toEqual([null, null, 'Burst rate and Uptake: say how likely', null])
    const state = session.links.value[0]
    server.putLink = () => ({ status: 409, body: { error: { message: 'This answer was saved from another window or device since you loaded it; reload to continue from the newer version' } } })
    session.editLink(state, (d) => (d.probability = 0.3))
    await vi.advanceTimersByTimeAsync(800)
    expect(state.autosave.status.value.state).toBe('conflict')
    session.editLink(state, (d) => (d.probability = 0.9))
    expect(state.data.probability).toBe(0.3)
    server.linkAnswers = [answer({ probability: 0.6, version: 4 })]
    await session.reloadLink(state)
    expect(state.data).toMatchObject({ probability: 0.6, rationale: '', version: 4 })
    expect(state.data.conflict).toMatchObject({ reloaded: true, typed: ['Chance: 30 %', 'Why: Frost'] })
  })
})

describe('compositions on the answering screen', () => {
  const composition = (id: number, quantityIds: number[], residual = false): Composition => ({
    id, studyId: 2, name: `Whole ${id}`, wording: 'Households by answer.', residual, residualLabel: residual ? 'Other' : '', version: 1, createdAt: '', updatedAt: '',
    shares: quantityIds.map((quantityId, i) => ({ quantityId, name: `Share ${quantityId}`, symbol: `s${quantityId}`, position: i + 1 })),
  })
  const states = [11, 12, 13].map((quantityId) => ({ item: { quantityId } }) as unknown as QuantityState)

  it('keeps the compositions with two or more shares in the round, and names what takes the rest', () => {
    const found = roundCompositions([composition(1, [11, 12, 13]), composition(2, [11, 99]), composition(3, [12, 13, 98], true), composition(4, [13, 11], true)], states)
    expect(found.map((c) => [c.composition.id, c.shares.map((s) => s.quantityId), c.restLabel])).toEqual([
      [1, [11, 12, 13], null],
      [3, [12, 13], 'Other and the shares not asked in this round'],
      [4, [13, 11], 'Other'],
    ])
    expect(found[0].shares[1].state).toBe(states[1])
  })
})
