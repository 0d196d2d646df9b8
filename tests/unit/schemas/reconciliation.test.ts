import { describe, expect, it } from 'vitest'
import { ValidationError } from 'yup'
import { RECONCILED_NEEDS, RECONCILED_RATIONALE_MIN, reconciliationSchema } from '@shared/schemas/reconciliation'

/** Field → message of every error the schema reports for a body. */
async function problems(body: Record<string, unknown>): Promise<Record<string, string>> {
  try {
    await reconciliationSchema.validate(body, { abortEarly: false })
    return {}
  } catch (err) {
    if (!(err instanceof ValidationError)) throw err
    return Object.fromEntries(err.inner.map((e) => [e.path ?? '', e.message]))
  }
}

const draft = { roundId: 7, method: 'linear', weights: 'equal', version: 0 }
const why = 'The pooled fit follows the two panels and the gamma tail suits the flow data.'

describe('a reconciled prior needs a family and a written reason (Priorsmith rule)', () => {
  it('saves a draft without either', async () => {
    expect(await problems(draft)).toEqual({})
  })

  it('refuses marking reconciled without a family or with a short reason, whatever the spaces', async () => {
    expect(await problems({ ...draft, reconciled: true })).toEqual({ family: RECONCILED_NEEDS.family, rationale: RECONCILED_NEEDS.rationale })
    const short = `  ${'x'.repeat(RECONCILED_RATIONALE_MIN - 1)}   `
    expect(await problems({ ...draft, reconciled: true, family: 'gamma', rationale: short })).toEqual({ rationale: RECONCILED_NEEDS.rationale })
  })

  it('accepts a family and a reason of exactly the minimum length', async () => {
    expect(RECONCILED_RATIONALE_MIN).toBe(20)
    expect(await problems({ ...draft, reconciled: true, family: 'gamma', rationale: 'y'.repeat(RECONCILED_RATIONALE_MIN) })).toEqual({})
  })

  it('takes the family of hand-adjusted parameters as the choice', async () => {
    const adjusted = { family: 'gamma', shape: 4, rate: 2 }
    expect(await problems({ ...draft, reconciled: true, distribution: adjusted, adjustReason: 'Tail widened after the site visit.', rationale: why })).toEqual({})
  })
})
