// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput, ElOption } from 'element-plus'
import ReturnDialog from '@/components/record/ReturnDialog.vue'

const returnRecord = vi.fn(async () => {})
vi.mock('@/stores/record', () => ({ useRecordStore: () => ({ returnRecord }) }))
vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

/** Native <select> in place of the Element Plus picker (its popper needs a real layout); options come from its slot. */
const SelectStub = defineComponent({
  props: { modelValue: { type: String, default: undefined } },
  emits: ['update:modelValue', 'change'],
  setup(props, { emit, slots }) {
    return () =>
      h(
        'select',
        {
          'data-testid': 'section-select',
          value: props.modelValue ?? '',
          onChange: (e: Event) => {
            const value = (e.target as HTMLSelectElement).value
            emit('update:modelValue', value)
            emit('change', value)
          },
        },
        slots.default?.(),
      )
  },
})
const OptionStub = defineComponent({
  props: { value: { type: String, required: true }, label: { type: String, default: '' } },
  setup: (props) => () => h('option', { value: props.value }, props.label),
})

/** The record page passes a fresh list of section names on every render, as RecordView does. */
function mountWithParent() {
  const open = ref(true)
  const renders = ref(0)
  const Parent = defineComponent({
    setup() {
      return () => {
        void renders.value
        return h(ReturnDialog, {
          open: open.value,
          'onUpdate:open': (v: boolean) => (open.value = v),
          studyId: 7,
          sections: ['Elicited quantities', 'Kestrel Valley flow'].map((s) => s),
        })
      }
    },
  })
  const wrapper = mount(Parent, {
    attachTo: document.body,
    global: {
      components: { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput, ElOption },
      stubs: { ElSelect: SelectStub, ElOption: OptionStub, transition: false, 'transition-group': false },
    },
  })
  return { wrapper, open, renders }
}

const page = () => new DOMWrapper(document.body)

afterEach(() => {
  vi.clearAllMocks()
  document.body.innerHTML = ''
})

describe('ReturnDialog', () => {
  it('returns the record under the section the reviewer picked, with the comment', async () => {
    const t = mountWithParent()
    await vi.waitFor(() => expect(document.body.querySelector('form#record-return-form')).not.toBeNull())
    await page().get('select[data-testid="section-select"]').setValue('Kestrel Valley flow')
    t.renders.value += 1
    await flushPromises()
    await page().get('[data-testid="record-return-comment"] textarea').setValue('The flow section needs the 2019 gauge data.')
    await page().get('form#record-return-form').trigger('submit')
    // The schema check before the save is asynchronous: wait for the dialog to close.
    await vi.waitFor(() => expect(t.open.value).toBe(false))
    expect(returnRecord).toHaveBeenCalledTimes(1)
    expect(returnRecord).toHaveBeenCalledWith(7, { section: 'Kestrel Valley flow', comment: 'The flow section needs the 2019 gauge data.' })
    t.wrapper.unmount()
  })

  it('starts again from "General" and an empty comment each time it opens', async () => {
    const t = mountWithParent()
    await vi.waitFor(() => expect(document.body.querySelector('form#record-return-form')).not.toBeNull())
    await page().get('select[data-testid="section-select"]').setValue('Kestrel Valley flow')
    t.open.value = false
    await flushPromises()
    t.open.value = true
    await flushPromises()
    await page().get('form#record-return-form').trigger('submit')
    // The emptied comment is refused in the browser: nothing is sent.
    await vi.waitFor(() => expect(page().get('[data-testid="record-return-comment"]').text()).toContain('Say what needs to change'))
    expect(returnRecord).not.toHaveBeenCalled()
    expect((page().get('select[data-testid="section-select"]').element as HTMLSelectElement).value).toBe('General')
    t.wrapper.unmount()
  })
})
