// @vitest-environment happy-dom
import { describe, expect, it, vi } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton, ElIcon } from 'element-plus'
import type { Distribution } from '@shared/stats'
import ModelCodeBlock from '@/components/record/ModelCodeBlock.vue'
import { checkModelLine } from '@/record/modelCheck'
import { FLOW_PRIOR, finalPrior } from './fixtures'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

describe('model-code round-trip check', () => {
  const prior = finalPrior(FLOW_PRIOR, 'flow')

  it('reads each generated line back in its own parameterisation and reports the agreement', () => {
    for (const line of prior.modelCode) {
      const result = checkModelLine(line, prior)
      expect(result.ok, line.language).toBe(true)
      expect(result.readBack?.family).toBe('normal')
      const lang = { stan: 'Stan', pymc: 'PyMC', jags: 'JAGS', brms: 'brms' }[line.language]
      // Says what the check is: Priorsmith's reader applying the language's documented parameterisation, not the language run.
      expect(result.text).toBe(`Read by Priorsmith (not by ${lang} itself) with ${lang}’s documented parameterisation: reads back as Normal(mean 3.2, sd 1.1), quantiles agree to ${result.text.split('agree to ')[1]}`)
      expect(result.text).toMatch(/quantiles agree to (0|\de-1[5-7])$/)
    }
  })

  it('catches a JAGS line that gives the sd where JAGS reads a precision', () => {
    const wrong = { language: 'jags' as const, code: 'flow ~ dnorm(3.2, 1.1)' }
    const result = checkModelLine(wrong, prior)
    expect(result.ok).toBe(false)
    // JAGS reads 1.1 as the precision: sd = 1/sqrt(1.1)
    expect(result.text).toMatch(/^Check failed: read by Priorsmith \(not by JAGS itself\) with JAGS’s documented parameterisation: reads back as Normal\(mean 3\.2, sd 0\.953463\), quantiles differ by \de-\d+ \(more than 1e-6\)$/)
  })

  it('reports a line it cannot read, and skips brms for a scaled beta', () => {
    expect(checkModelLine({ language: 'stan', code: 'flow ~ cauchy(0, 1);' }, prior)).toMatchObject({ ok: false, skipped: false })
    expect(checkModelLine({ language: 'stan', code: 'flow ~ cauchy(0, 1);' }, prior).text).toMatch(/^Check failed: the line cannot be read as a normal prior/)
    const scaled: Distribution = { family: 'scaled-beta', alpha: 2, beta: 5, lower: 10, upper: 30 }
    const sb = finalPrior(scaled, 'cost')
    const brms = sb.modelCode.find((m) => m.language === 'brms')!
    expect(checkModelLine(brms, sb)).toMatchObject({ ok: false, skipped: true })
    expect(checkModelLine(sb.modelCode.find((m) => m.language === 'stan')!, sb).ok).toBe(true)
  })

  it('shows the result under the line when "Check" is pressed', async () => {
    const w = mount(ModelCodeBlock, { props: { prior, symbol: 'flow' }, global: { components: { ElButton, ElIcon } } })
    const lines = w.findAll('[data-testid="model-code"]')
    expect(lines.map((l) => l.attributes('data-language'))).toEqual(['stan', 'pymc', 'jags', 'brms'])
    expect(lines[2].text()).toBe(`flow ~ dnorm(3.2, ${Number((1 / (1.1 * 1.1)).toPrecision(15))})  # precision = 1/sd^2`)
    expect(w.find('[data-testid="model-check-result"]').exists()).toBe(false)

    await w.get('[data-testid="model-check"][data-language="jags"]').trigger('click')
    const result = w.get('[data-testid="model-check-result"][data-language="jags"]')
    expect(result.text()).toMatch(/reads back as Normal\(mean 3\.2, sd 1\.1\), quantiles agree to (0|\de-1[5-7])/)
    expect(result.attributes('data-ok')).toBe('true')
    expect(w.findAll('[data-testid="model-check-result"]')).toHaveLength(1)
  })

  it('shows a failure when the line on the page does not state the final prior', async () => {
    const tampered = { ...prior, modelCode: prior.modelCode.map((m) => (m.language === 'stan' ? { ...m, code: 'flow ~ normal(3.2, 1.2);' } : m)) }
    const w = mount(ModelCodeBlock, { props: { prior: tampered, symbol: 'flow' }, global: { components: { ElButton, ElIcon } } })
    await w.get('[data-testid="model-check"][data-language="stan"]').trigger('click')
    const result = w.get('[data-testid="model-check-result"][data-language="stan"]')
    expect(result.attributes('data-ok')).toBe('false')
    expect(result.classes()).toContain('is-failed')
    expect(result.text()).toContain('Check failed: read by Priorsmith (not by Stan itself) with Stan’s documented parameterisation: reads back as Normal(mean 3.2, sd 1.2)')
  })
})
