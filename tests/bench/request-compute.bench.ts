// Computation done for web requests outside the analysis queue (not a test; run with
// `tsx tests/bench/request-compute.bench.ts`): how long each takes at the largest sizes the API accepts, to judge whether
// it belongs on the queue. Prints the median and the slowest of the repeats, in milliseconds, per operation.
import { compositionImpact } from '../../shared/elicitation/composition-impact'
import { compositionPrior, type CompositionShareInput } from '../../shared/elicitation/composition-prior'
import { combine, fitCombination, fitConsensus, leaveOneOut, resolveWeights, summarise, type Component } from '../../shared/elicitation/reconcile'
import { COMPOSITION_MAX_SHARES } from '../../shared/schemas/compositions'
import { JOINT_DRAWS_DEFAULT, JOINT_DRAWS_MAX } from '../../shared/schemas/link-reconciliation'
import { nearestCorrelation, type Distribution, type MultinomialData } from '../../shared/stats/index'
import { computeJointDraws, type JointDrawsTask } from '../../server/compute/tasks'
import { ComputeThread } from '../../server/compute/threads'

const REPEATS = 15

function time(label: string, run: () => unknown, repeats = REPEATS): void {
  run() // warm-up: the first call compiles the code paths
  const ms: number[] = []
  for (let i = 0; i < repeats; i++) {
    const t = performance.now()
    run()
    ms.push(performance.now() - t)
  }
  ms.sort((a, b) => a - b)
  console.log(`${label.padEnd(78)} median ${ms[Math.floor(ms.length / 2)].toFixed(2).padStart(8)} ms   slowest ${ms[ms.length - 1].toFixed(2).padStart(8)} ms`)
}

// Compositions: k reconciled shares (beta marginals with means that sum to about 1), then the Dirichlet on 200 rows of
// multinomial counts (the POST /api/compositions/:id/impact request, and the GET …/dirichlet it starts from).
console.log('Compositions (POST /api/compositions/:id/impact: the Dirichlet fit, then the analysis with its 11-width sweep)')
for (const k of [3, 6, COMPOSITION_MAX_SHARES]) {
  const shares: CompositionShareInput[] = Array.from({ length: k }, (_, i) => {
    const m = (i + 1) / ((k * (k + 1)) / 2)
    return { quantityId: i + 1, name: `Share ${i + 1}`, symbol: `s${i + 1}`, prior: { family: 'beta', alpha: 40 * m, beta: 40 * (1 - m) } }
  })
  const prior = compositionPrior('Household uptake', shares, null)
  if (!prior.fit) throw new Error(`no Dirichlet for ${k} shares: ${prior.problem}`)
  const alpha = prior.fit.alpha
  const data: MultinomialData = { model: 'multinomial', counts: Array.from({ length: 200 }, (_, r) => alpha.map((_, j) => (r * 7 + j * 3) % 11)) }
  time(`  ${k} shares: Dirichlet from the reconciled shares (compositionPrior)`, () => compositionPrior('Household uptake', shares, null))
  time(`  ${k} shares, 200 rows: compositionImpact`, () => compositionImpact(shares.map((s) => s.name), alpha, data))
}

// Reconciliation (GET /api/quantities/:id/reconciliation and every save): the pool, its summary, the fit of every family
// to it and the leave-one-out pools; and the pool and consensus fits the impact route makes before it queues a job.
console.log('Reconciliation view and the impact route\'s candidate priors')
const expertPrior = (i: number): Distribution => (i % 3 === 0
  ? { family: 'lognormal', meanlog: 2.3 + 0.05 * i, sdlog: 0.3 + 0.01 * i }
  : i % 3 === 1 ? { family: 'gamma', shape: 8 + i, rate: 0.7 } : { family: 'normal', mu: 11 + 0.3 * i, sigma: 2 + 0.1 * i })
for (const n of [5, 10, 20]) {
  const components: Component[] = Array.from({ length: n }, (_, i) => ({ expertId: i + 1, label: `Expert ${i + 1}`, distribution: expertPrior(i) }))
  const weights = resolveWeights('equal', n)
  for (const method of ['linear', 'logarithmic'] as const) {
    time(`  ${n} experts, ${method} pool: combine, summarise, fit every family, leave-one-out`, () => {
      const u = combine(method, components, weights)
      summarise(u)
      fitCombination(u, { kind: 'positive' })
      leaveOneOut(method, components, weights)
    })
  }
}
time('  consensus of three agreed quantiles: fit every family (fitConsensus)', () => fitConsensus([{ value: 9, prob: 0.25 }, { value: 11.5, prob: 0.5 }, { value: 14, prob: 0.75 }], { kind: 'positive' }))

// Linked quantities (GET /api/quantities/:id/joint-draws): the correlation matrix's nearest-correlation repair (in the
// request), and the seeded draws as CSV text, which the web process makes on a compute thread of its own.
console.log('Linked quantities: matrix repair, and joint draws as CSV')
const marginals: Distribution[] = [0, 1, 2, 3, 4].map(expertPrior)
const R = [0, 1, 2, 3, 4].map((i) => [0, 1, 2, 3, 4].map((j) => (i === j ? 1 : i + j === 4 ? -0.9 : 0.8)))
time('  5 × 5 matrix that is not a correlation matrix: nearestCorrelation', () => nearestCorrelation(R))
const repaired = nearestCorrelation(R).matrix
const drawsTask = (n: number): JointDrawsTask => ({ symbols: ['a', 'b', 'c', 'd', 'e'], marginals, matrix: repaired, n, seed: 1 })
for (const n of [JOINT_DRAWS_DEFAULT, JOINT_DRAWS_MAX]) time(`  5 quantities, ${n} draws: computeJointDraws`, () => computeJointDraws(drawsTask(n)), 5)

// What other requests wait for while one download of the most draws is made: the longest stall of the event loop, with
// the draws made on the event loop (as the request did before) and on a compute thread (as it does now).
const stall = async (make: () => Promise<unknown>): Promise<number> => {
  // A 1 ms ticker: the longest gap between its ticks is how long another request would have waited.
  let last = performance.now()
  let longest = 0
  const ticker = setInterval(() => {
    const now = performance.now()
    longest = Math.max(longest, now - last)
    last = now
  }, 1)
  await make()
  await new Promise((resolve) => setTimeout(resolve, 20))
  clearInterval(ticker)
  return longest
}
const thread = new ComputeThread()
await thread.jointDraws(drawsTask(10), 60_000) // the thread loads the engine once, before the first download
const onLoop = await stall(async () => computeJointDraws(drawsTask(JOINT_DRAWS_MAX)))
const onThread = await stall(() => thread.jointDraws(drawsTask(JOINT_DRAWS_MAX), 120_000))
await thread.stop()
console.log(`  ${JOINT_DRAWS_MAX} draws: longest event-loop stall ${onLoop.toFixed(0)} ms made on the event loop, ${onThread.toFixed(0)} ms made on a compute thread`)
