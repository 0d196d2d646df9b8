import { modelCodeWithCheck } from '@shared/elicitation/model-code'
import { quantile, type Distribution } from '@shared/stats'
import type { RecordComment, RecordQuantity, RecordStatus, RecordView } from '@/api/record'

export const FLOW_PRIOR: Distribution = { family: 'normal', mu: 3.2, sigma: 1.1 }

export function finalPrior(d: Distribution, symbol: string) {
  return {
    distribution: d,
    q05: quantile(d, 0.05),
    q50: quantile(d, 0.5),
    q95: quantile(d, 0.95),
    mean: 3.2,
    sd: 1.1,
    modelCode: modelCodeWithCheck(d, symbol, quantile),
  }
}

export function quantity(overrides: Partial<RecordQuantity> = {}): RecordQuantity {
  return {
    name: 'Night-flow reduction',
    symbol: 'flow',
    unit: 'L/s',
    question: 'Mean reduction in minimum night flow after pressure management?',
    support: { kind: 'real' },
    leftOut: null,
    assumptions: 'Valves maintained as specified.',
    evidenceNotes: 'Eight pilot districts.',
    evidenceFiles: [],
    rounds: [{ number: 1, title: 'Round 1', method: 'quantile', edges: null, chips: null, opensAt: '2026-03-01T09:00:00.000Z', closesAt: '2026-03-08T17:00:00.000Z', feedback: false }],
    judgements: [
      {
        round: 1, expert: { code: 'Expert 1' }, method: 'quantile', rationale: 'Pilot districts.',
        answer: { lower: -2, upper: 8, points: [{ value: 2.3, prob: 0.25 }, { value: 3, prob: 0.5 }, { value: 3.7, prob: 0.75 }] },
        fit: { distribution: { family: 'normal', mu: 3, sigma: 1 }, sse: 0.0012, q05: 1.355, q50: 3, q95: 4.645, mean: 3, sd: 1 },
      },
    ],
    combination: {
      round: 1, method: 'linear', weightsMode: 'equal', weights: [1], weightsReason: '', cutoff: 0, excludedExperts: [], consensus: null,
      adjusted: false, adjustReason: '', rationale: 'One expert in this fixture.', status: 'reconciled',
    },
    finalPrior: finalPrior(FLOW_PRIOR, 'flow'),
    pilotData: [],
    impact: null,
    ...overrides,
  }
}

export function comment(id: number, section: string, body: string, kind: RecordComment['kind'] = 'comment', createdAt = `2026-03-0${id}T10:00:00.000Z`): RecordComment {
  return { id, section, body, kind, replyTo: null, outcome: null, author: kind === 'return' ? 'Ingrid Solberg' : 'Priya Natarajan', createdAt }
}

export function recordView(status: RecordStatus = 'draft', overrides: Partial<RecordView> = {}): RecordView {
  const hash = 'a'.repeat(64)
  return {
    record: {
      version: 1, status, showNames: false, rowVersion: 1, contentHash: status === 'draft' ? null : hash, liveHash: hash,
      submittedAt: status === 'draft' ? null : '2026-03-10T10:00:00.000Z', signedOffAt: status === 'signed_off' ? '2026-03-11T10:00:00.000Z' : null,
      signedOffBy: status === 'signed_off' ? 'Ingrid Solberg' : null, auditHead: status === 'signed_off' ? 'b'.repeat(64) : null, basedOn: null, chartsFor: [],
      returned: false, openComments: [],
    },
    content: {
      $schema: 'https://priorsmith.example/schemas/prior-record-1.json', schemaVersion: '1.0',
      study: { title: 'Kestrel record', context: 'Decide on pressure management.', owner: 'Priya Natarajan' },
      version: 1, namesShown: false,
      panel: [{ code: 'Expert 1', declarations: [{ round: 1, expertise: 'Leakage control, 12 years.', interests: 'none', interestsText: '', seenPilotData: false, practice: null }] }],
      calibration: { questions: [{ question: 'Bursts in 2024?', unit: 'bursts', trueValue: 61 }], method: 'Cooke’s classical model' },
      quantities: [quantity(), quantity({ name: 'Leak-alert uptake', symbol: 'uptake', unit: 'share', support: { kind: 'proportion' }, finalPrior: null, combination: null, judgements: [] })],
      cautions: ['The priors in this record can decide the result; they must be reviewed by a qualified statistician.'],
    },
    quantityIds: { flow: 11, uptake: 12 },
    comments: [],
    versions: [{ version: 1, status, contentHash: status === 'draft' ? null : hash, signedOffAt: null }],
    auditChain: { intact: true, events: 42, brokenAt: null },
    changeHistory: [{ at: '2026-03-10T10:00:00.000Z', action: 'record.submit', what: 'Record submitted for review', subject: 'record:v1', subjectText: 'record version 1', actor: 'Priya Natarajan', hash: 'c'.repeat(64) }],
    ...overrides,
  }
}
