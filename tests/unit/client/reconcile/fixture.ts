import { quantile, type Distribution } from '@shared/stats'
import type { ReconcileExpert, ReconciliationView } from '@/api/reconciliation'

// A CONSTRUCTED two-expert panel, COOKE-worked-example of tests/unit/stats/fixtures/checks.json (values from an independent
// Python implementation of Cooke's classical model, Cooke 1991 ch. 12; not from a publication): realisations and the
// 5/50/95 % values of experts A and B. Normalised weights at α = 0: 0.957753869124 / 0.0422461308765; at α = 0.05: 1 / 0.
export const REALISATIONS = [12, 35, 7.5, 150, 0.8, 48, 23, 5.2, 90, 310]
export const EXPERT_A = [[5, 10, 20], [20, 40, 70], [2, 6, 12], [60, 120, 200], [0.3, 1, 3], [15, 30, 45], [10, 25, 50], [5.5, 9, 15], [40, 80, 160], [150, 350, 700]]
export const EXPERT_B = [[13, 14, 15], [30, 33, 36], [8, 9, 10], [100, 110, 125], [0.5, 0.7, 0.9], [40, 50, 55], [25, 28, 30], [4.6, 4.9, 5.1], [60, 70, 80], [280, 320, 360]]

export function expert(expertId: number, label: string, name: string, distribution: Distribution, rationale = 'Night-flow records of the eight pilot districts.', warnings: string[] = []): ReconcileExpert {
  return {
    judgementId: expertId * 10, expertId, name, label, distribution, sse: 0.0001, method: 'quantile',
    answer: { lower: 0, upper: 30, points: [{ value: quantile(distribution, 0.25), prob: 0.25 }, { value: quantile(distribution, 0.5), prob: 0.5 }, { value: quantile(distribution, 0.75), prob: 0.75 }] },
    rationale, q05: quantile(distribution, 0.05), q50: quantile(distribution, 0.5), q95: quantile(distribution, 0.95), warnings,
  }
}

/** Two experts, N(10, 2²) and N(14, 3²) (POOL-linear-2), with the constructed Cooke panel as their calibration answers. */
export function viewFixture(overrides: Partial<ReconciliationView> = {}): ReconciliationView {
  const experts = [
    expert(3, 'Expert 1', 'Tomasz Wierzbicki', { family: 'normal', mu: 10, sigma: 2 }),
    expert(4, 'Expert 2', 'Helen Okafor', { family: 'normal', mu: 14, sigma: 3 }),
  ]
  return {
    rounds: [{ id: 7, number: 1, title: 'Round 1', status: 'closed', submitted: 2 }],
    roundId: 7,
    settings: { roundId: 7, method: 'linear', weights: 'equal', cutoff: 0, excludedExperts: [] },
    quantity: {
      id: 5, studyId: 1, name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow?', support: { kind: 'real' },
      assumptions: '', evidenceNotes: '', position: 1, version: 1, files: [], createdAt: '', updatedAt: '',
    },
    support: { kind: 'real' },
    experts,
    included: [3, 4],
    weights: [0.5, 0.5],
    pool: { q05: 7.28598745543, q50: 11.6, q95: 17.8454032129, mean: 12, sd: 3.2403703492 },
    fits: [],
    leaveOneOut: [],
    disagreements: [],
    consensusCheck: null,
    problems: {},
    weightCautions: [],
    calibration: {
      questionCount: 10, cutoff: 0, scores: null, realizations: REALISATIONS,
      assessments: [{ id: '3', assessments: EXPERT_A }, { id: '4', assessments: EXPERT_B }],
    },
    saved: null,
    history: [],
    ...overrides,
  }
}
