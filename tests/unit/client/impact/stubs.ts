import { defineComponent, h } from 'vue'

/** Native <select> in place of el-select (its popper needs a real layout); options come from the slot. */
export const SelectStub = defineComponent({
  name: 'ElSelect',
  props: { modelValue: { type: [String, Number], default: undefined }, disabled: { type: Boolean, default: false } },
  emits: ['update:modelValue', 'change', 'blur'],
  setup(props, { emit, slots, attrs }) {
    return () =>
      h(
        'select',
        {
          ...attrs,
          disabled: props.disabled,
          value: props.modelValue ?? '',
          onChange: (e: Event) => {
            const value = (e.target as HTMLSelectElement).value
            emit('update:modelValue', value)
            emit('change', value)
          },
        },
        [h('option', { value: '' }, ''), ...(slots.default?.() ?? [])],
      )
  },
})

export const OptionStub = defineComponent({
  name: 'ElOption',
  props: { value: { type: [String, Number], required: true }, label: { type: String, default: '' } },
  setup(props) {
    return () => h('option', { value: props.value }, props.label)
  },
})
