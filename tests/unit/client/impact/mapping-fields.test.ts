// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { defineComponent, h } from 'vue'
import { flushPromises, mount } from '@vue/test-utils'
import { useForm } from 'vee-validate'
import { ElFormItem, ElInput, ElRadio, ElRadioGroup } from 'element-plus'
import PilotMappingFields from '@/components/pilot/PilotMappingFields.vue'
import { OptionStub, SelectStub } from './stubs'

const COLUMNS = ['district', 'bursts', 'exposure_100km_years']
const MAPPING_IDS = [
  'pilot-value-column', 'pilot-sigma', 'pilot-sigma-scale', 'pilot-binomial-layout', 'pilot-successes-column',
  'pilot-trials-column', 'pilot-binary-column', 'pilot-count-column', 'pilot-exposure-column',
]

/** The mapping fields inside a vee-validate form, as in the upload drawer. */
function mountFields(initial: Record<string, unknown> = {}) {
  let form!: ReturnType<typeof useForm>
  const Host = defineComponent({
    setup() {
      form = useForm({ initialValues: { binomialLayout: 'counts', ...initial } })
      return () => h(PilotMappingFields, { columns: COLUMNS, unit: 'bursts/100 km/yr' })
    },
  })
  const wrapper = mount(Host, {
    attachTo: document.body,
    global: {
      components: { ElFormItem, ElInput, ElRadio, ElRadioGroup },
      stubs: { 'el-select': SelectStub, 'el-option': OptionStub, transition: false },
    },
  })
  return { wrapper, form: () => form }
}

const shownIds = (wrapper: ReturnType<typeof mount>) =>
  MAPPING_IDS.filter((id) => wrapper.find(`[data-testid="${id}"]`).exists())

describe('PilotMappingFields', () => {
  afterEach(() => {
    document.body.innerHTML = ''
  })

  it('shows the fields of the chosen model, and none before a model is chosen', async () => {
    const { wrapper } = mountFields()
    expect(shownIds(wrapper)).toEqual([])

    const model = wrapper.get('select[data-testid="pilot-model"]')
    await model.setValue('normal-known-sigma')
    expect(shownIds(wrapper)).toEqual(['pilot-value-column', 'pilot-sigma'])
    expect(wrapper.text()).toContain('Known measurement sd σ (bursts/100 km/yr)')

    await model.setValue('normal')
    expect(shownIds(wrapper)).toEqual(['pilot-value-column', 'pilot-sigma-scale'])
    expect(wrapper.text()).toContain('half-normal prior')

    await model.setValue('binomial')
    expect(shownIds(wrapper)).toEqual(['pilot-binomial-layout', 'pilot-successes-column', 'pilot-trials-column'])

    await model.setValue('poisson')
    expect(shownIds(wrapper)).toEqual(['pilot-count-column', 'pilot-exposure-column'])
  })

  it('switches the binomial fields with the layout: successes and trials, or one 0/1 column', async () => {
    const { wrapper, form } = mountFields({ model: 'binomial' })
    expect(shownIds(wrapper)).toEqual(['pilot-binomial-layout', 'pilot-successes-column', 'pilot-trials-column'])
    await wrapper.get('[data-testid="pilot-binomial-layout"] input[value="binary"]').setValue(true)
    await flushPromises()
    expect(form().values.binomialLayout).toBe('binary')
    expect(shownIds(wrapper)).toEqual(['pilot-binomial-layout', 'pilot-binary-column'])
  })

  it("offers the file's columns in every column select and writes the choice into the form", async () => {
    const { wrapper, form } = mountFields({ model: 'poisson' })
    const counts = wrapper.get('select[data-testid="pilot-count-column"]')
    expect(counts.findAll('option').map((o) => o.text()).filter(Boolean)).toEqual(COLUMNS)
    await counts.setValue('bursts')
    await wrapper.get('select[data-testid="pilot-exposure-column"]').setValue('exposure_100km_years')
    expect(form().values).toMatchObject({ model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure_100km_years' })
  })

  it('keeps a typed σ as a number-like text in the form', async () => {
    const { wrapper, form } = mountFields({ model: 'normal-known-sigma' })
    await wrapper.get('[data-testid="pilot-sigma"] input').setValue('1.5')
    expect(form().values.sigma).toBe('1.5')
    await wrapper.get('[data-testid="pilot-sigma"] input').setValue('')
    expect(form().values.sigma).toBeUndefined()
  })
})
