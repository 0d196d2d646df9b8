// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, nextTick, ref } from 'vue'
import { flushPromises, mount } from '@vue/test-utils'
import { toTypedSchema } from '@vee-validate/yup'
import { object, string } from 'yup'
import { ApiError } from '@/api/client'
import { useDialogForm } from '@/composables/useDialogForm'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

const schema = object({ title: string().trim().required('Enter a title').max(20, 'Use at most 20 characters'), note: string().default('') })

interface Item { id: number; title: string; note: string; version: number }

/** A form dialog reduced to its skeleton: the composable's state, readable from the test. */
function harness(options: { item?: Item | null; save: (values: { title: string; note?: string }, version: number) => Promise<void>; reload?: (item: Item) => Promise<Item> }) {
  const open = ref(false)
  const item = ref<Item | null>(options.item ?? null)
  let state!: ReturnType<typeof useDialogForm<{ title?: string; note?: string }, { title: string; note?: string }, Item>>
  const Comp = defineComponent({
    setup() {
      state = useDialogForm({
        open,
        schema: toTypedSchema(schema),
        values: () => ({ title: item.value?.title ?? '', note: item.value?.note ?? '' }),
        source: () => item.value,
        fields: ['title'],
        save: options.save,
        versioned: { item: () => item.value, reload: options.reload ?? (async (i) => i) },
      })
      return () => h('div')
    },
  })
  const wrapper = mount(Comp)
  return { open, item, wrapper, get state() { return state } }
}

async function submit(state: { onSubmit: (e?: Event) => Promise<unknown> }) {
  await state.onSubmit()
  await flushPromises()
}

afterEach(() => vi.clearAllMocks())

describe('useDialogForm', () => {
  it('fills the form each time it opens and keeps what is typed while it stays open', async () => {
    const t = harness({ item: { id: 1, title: 'Main renewal', note: '', version: 3 }, save: async () => {} })
    t.open.value = true
    await nextTick()
    expect(t.state.values.title).toBe('Main renewal')
    t.state.setFieldValue('title', 'Typed')
    t.item.value = { id: 1, title: 'Refreshed behind the form', note: '', version: 4 }
    await nextTick()
    expect(t.state.values.title).toBe('Typed')
    expect(t.state.baseVersion.value).toBe(3)
    t.open.value = false
    await nextTick()
    t.open.value = true
    await nextTick()
    expect(t.state.values.title).toBe('Refreshed behind the form')
    expect(t.state.baseVersion.value).toBe(4)
  })

  it('checks the schema in the browser before anything is sent', async () => {
    const save = vi.fn(async () => {})
    const t = harness({ save })
    t.open.value = true
    await nextTick()
    await submit(t.state)
    expect(save).not.toHaveBeenCalled()
    expect(t.state.errors.value.title).toBe('Enter a title')
    expect(t.open.value).toBe(true)
  })

  it('saves with the version the edit started from and closes', async () => {
    const save = vi.fn(async () => {})
    const t = harness({ item: { id: 1, title: 'Main renewal', note: '', version: 3 }, save })
    t.open.value = true
    await nextTick()
    await submit(t.state)
    expect(save).toHaveBeenCalledWith({ title: 'Main renewal', note: '' }, 3)
    expect(t.open.value).toBe(false)
    expect(t.state.formError.value).toBeNull()
  })

  it('puts the server’s field errors on their fields and the rest above the form', async () => {
    const save = vi.fn(async () => {
      throw new ApiError(400, 'Some fields need attention', { title: 'This title is taken', colour: 'Not a field of this form' })
    })
    const t = harness({ save })
    t.open.value = true
    await nextTick()
    t.state.setFieldValue('title', 'Pressure zones')
    await submit(t.state)
    expect(t.state.errors.value.title).toBe('This title is taken')
    expect(t.state.formError.value).toBe('Some fields need attention Not a field of this form')
    expect(t.open.value).toBe(true)
  })

  it('after a 409 keeps what was typed, loads their version, and the next save replaces it', async () => {
    const theirs = { id: 1, title: 'Their title', note: 'theirs', version: 5 }
    let calls = 0
    const save = vi.fn(async () => {
      calls += 1
      if (calls === 1) throw new ApiError(409, 'Someone else changed it')
    })
    const t = harness({ item: { id: 1, title: 'Main renewal', note: '', version: 3 }, save, reload: async () => theirs })
    t.open.value = true
    await nextTick()
    t.state.setFieldValue('title', 'My title')
    await submit(t.state)
    expect(t.state.conflict.value).toBe(true)
    expect(t.state.theirs.value).toBeNull()
    expect(t.state.formError.value).toBeNull()
    expect(t.open.value).toBe(true)
    await t.state.reload()
    expect(t.state.theirs.value).toEqual(theirs)
    expect(t.state.values.title).toBe('My title')
    await submit(t.state)
    expect(save).toHaveBeenLastCalledWith({ title: 'My title', note: '' }, 5)
    expect(t.open.value).toBe(false)
  })

  it('treats a 409 on a new object as an error above the form', async () => {
    const t = harness({ save: async () => { throw new ApiError(409, 'The record is in review; that step is not possible now') } })
    t.open.value = true
    await nextTick()
    t.state.setFieldValue('title', 'Leak survey')
    await submit(t.state)
    expect(t.state.conflict.value).toBe(false)
    expect(t.state.formError.value).toBe('The record is in review; that step is not possible now')
  })

  it('sends the value picked through a field’s model (as a select binds it), even when the list behind the form refreshes', async () => {
    const save = vi.fn(async () => {})
    const t = harness({ item: { id: 1, title: 'Main renewal', note: 'General', version: 3 }, save })
    t.open.value = true
    await nextTick()
    const [note] = t.state.defineField('note')
    note.value = 'Kestrel Valley flow'
    t.item.value = { id: 1, title: 'Main renewal', note: 'General', version: 4 }
    await nextTick()
    await submit(t.state)
    expect(save).toHaveBeenCalledWith({ title: 'Main renewal', note: 'Kestrel Valley flow' }, 3)
  })
})
