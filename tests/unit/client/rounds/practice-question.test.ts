// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { ElAlert, ElButton, ElForm, ElFormItem, ElInput } from 'element-plus'
import PracticeQuestion from '@/components/rounds/PracticeQuestion.vue'
import { mockFetch } from '../fetch-mock'

function mountPractice() {
  const mock = mockFetch((c) => {
    if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 'tok' } }
    if (c.url === '/api/rounds/5/practice') {
      return { status: 200, body: { declaration: null, practice: null, submittedAt: null, feedback: { q50: 1500 } } }
    }
  })
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const wrapper = mount(PracticeQuestion, {
    attachTo: document.body,
    props: { roundId: 5, question: 'Practice: how many kilometres of mains?', unit: 'km' },
    global: { plugins: [pinia], components: { ElAlert, ElButton, ElForm, ElFormItem, ElInput }, stubs: { transition: false } },
  })
  return { wrapper, calls: mock.calls }
}

type Wrapper = ReturnType<typeof mountPractice>['wrapper']
const input = (w: Wrapper, id: string) => w.get(`[data-testid="${id}"] input`)

async function answer(w: Wrapper, id: string, value: string) {
  await input(w, id).setValue(value)
  await w.get('form').trigger('submit')
  await flushPromises()
}

describe('PracticeQuestion', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('asks one value at a time, in the quantile-method order', async () => {
    const { wrapper } = mountPractice()
    const visible = () => ['practice-lower', 'practice-upper', 'practice-median', 'practice-q1', 'practice-q3'].filter((id) => wrapper.find(`[data-testid="${id}"]`).exists())
    expect(visible()).toEqual(['practice-lower'])
    expect(wrapper.find('[data-testid="practice-submit"]').exists()).toBe(false)
    await answer(wrapper, 'practice-lower', '1000')
    expect(visible()).toEqual(['practice-upper'])
    await answer(wrapper, 'practice-upper', '3000')
    expect(visible()).toEqual(['practice-median'])
    await answer(wrapper, 'practice-median', '1500')
    expect(visible()).toEqual(['practice-q1'])
    await answer(wrapper, 'practice-q1', '1200')
    expect(visible()).toEqual(['practice-q3'])
    expect(wrapper.find('[data-testid="practice-next"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="practice-submit"]').exists()).toBe(true)
    expect(wrapper.text()).toContain('you would be very surprised, about 1 chance in 100, to see the true answer fall beyond either')
    expect(wrapper.text()).not.toContain('5 % and 95 %')
    expect(wrapper.text()).toContain('Suppose you learn the true answer is above 1,500 km. Which value would it then be equally likely to fall above or below?')
    wrapper.unmount()
  })

  it('stops on a value out of order with an inline message, and sends nothing', async () => {
    const { wrapper, calls } = mountPractice()
    await answer(wrapper, 'practice-lower', '1000')
    await answer(wrapper, 'practice-upper', '900')
    await vi.waitFor(() => expect(wrapper.text()).toContain('The upper bound must be larger than your lower bound (1000)'))
    expect(input(wrapper, 'practice-upper').attributes('aria-invalid')).toBe('true')
    await answer(wrapper, 'practice-upper', 'abc')
    await vi.waitFor(() => expect(wrapper.text()).toContain('Enter a number, such as 12 or 0.35'))
    await answer(wrapper, 'practice-upper', '3,000')
    await vi.waitFor(() => expect(wrapper.text()).toContain('“3,000” could mean 3000 or 3.000'))
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0)
    wrapper.unmount()
  })

  it('goes back keeping the answers, and posts the five points ordered by value', async () => {
    const { wrapper, calls } = mountPractice()
    await answer(wrapper, 'practice-lower', '1000')
    await answer(wrapper, 'practice-upper', '3000')
    await wrapper.findAll('button').find((b) => b.text() === 'Back')!.trigger('click')
    await flushPromises()
    expect((input(wrapper, 'practice-upper').element as HTMLInputElement).value).toBe('3000')
    await answer(wrapper, 'practice-upper', '3 000')
    await input(wrapper, 'practice-median').setValue('1500,0')
    expect(wrapper.get('[data-testid="practice-understood"]').text()).toBe('Read as 1,500')
    await answer(wrapper, 'practice-median', '1500,0')
    await answer(wrapper, 'practice-q1', '1200')
    await answer(wrapper, 'practice-q3', '2000')
    const post = calls.find((c) => c.url === '/api/rounds/5/practice')
    expect(post?.method).toBe('POST')
    expect(post?.headers['x-csrf-token']).toBe('tok')
    expect(post?.body).toEqual({
      points: [
        { value: 1000, prob: 0.01 },
        { value: 1200, prob: 0.25 },
        { value: 1500, prob: 0.5 },
        { value: 2000, prob: 0.75 },
        { value: 3000, prob: 0.99 },
      ],
    })
    expect(wrapper.emitted('done')?.[0]?.[0]).toMatchObject({ feedback: { q50: 1500 } })
    wrapper.unmount()
  })
})
