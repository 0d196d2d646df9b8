import { describe, expect, it } from 'vitest'
import { auditActionLabel, auditDetailParts, auditSubjectLabel } from '@/utils/audit'

describe('audit trail wording', () => {
  it('maps action codes to plain words, and makes unknown codes readable', () => {
    expect(auditActionLabel('quantity.update')).toBe('Quantity edited')
    expect(auditActionLabel('study.member-remove')).toBe('Member removed')
    expect(auditActionLabel('dataset.upload')).toBe('Pilot data uploaded')
    expect(auditActionLabel('widget.polish-all')).toBe('Widget polish all')
  })

  it('names subjects, using known names when there are any', () => {
    expect(auditSubjectLabel('quantity:12')).toBe('Quantity 12')
    expect(auditSubjectLabel('quantity:12', { 'quantity:12': 'Burst rate (burst_rate)' })).toBe('Quantity: Burst rate (burst_rate)')
    expect(auditSubjectLabel(null)).toBe('—')
  })

  it('shows what changed as before → after, then the other facts', () => {
    expect(
      auditDetailParts({
        changed: ['name', 'support_kind'],
        before: { name: 'Burst rate', question: 'Q', support: { kind: 'positive' } },
        after: { name: 'Burst rate of old mains', question: 'Q', support: { kind: 'bounded', lower: 0, upper: 40 } },
      }),
    ).toEqual(['name: Burst rate → Burst rate of old mains', 'support: positive → bounded [0, 40]', 'changed: name, support kind'])
    expect(auditDetailParts({ before: null, after: 'reviewer' })).toEqual(['— → reviewer'])
    expect(auditDetailParts({ trueValueBefore: null, trueValueAfter: 61, questionChanged: false })).toEqual(['true value: — → 61', 'question changed: false'])
    expect(auditDetailParts(null)).toEqual([])
  })

  it('shortens long values', () => {
    const [part] = auditDetailParts({ question: 'x'.repeat(200) })
    expect(part?.length).toBeLessThan(80)
    expect(part?.endsWith('…')).toBe(true)
  })
})
