import { fork, type ChildProcess } from 'node:child_process'
import { setPriority } from 'node:os'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { EngineInputError } from '../../shared/stats/index'
import { computeImpact, type ImpactTask } from './tasks'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
type Pending = { resolve: (v: ReturnType<typeof computeImpact>) => void; reject: (e: Error) => void }

let child: ChildProcess | null = null
let nextId = 1
const pending = new Map<number, Pending>()

function worker(): ChildProcess {
  if (child && child.connected) return child
  const c = fork(path.join(root, 'server/compute/worker.ts'), [], { cwd: root, execArgv: ['--import', 'tsx'], serialization: 'advanced', stdio: ['ignore', 'inherit', 'inherit', 'ipc'] })
  // Below the web process in the scheduler's order, so that a long sweep yields the CPU to experts' autosaves.
  if (c.pid) {
    try {
      setPriority(c.pid, 10)
    } catch {
      // Not permitted here: the analysis still runs, at normal priority.
    }
  }
  c.on('message', (m: { id: number; ok: boolean; result?: ReturnType<typeof computeImpact>; error?: { message: string; field?: string; engine: boolean } }) => {
    const p = pending.get(m.id)
    if (!p) return
    pending.delete(m.id)
    if (m.ok) p.resolve(m.result!)
    else p.reject(m.error!.engine ? new EngineInputError(m.error!.field ?? 'input', m.error!.message) : new Error(m.error!.message))
  })
  c.on('exit', () => {
    if (child === c) child = null
    for (const [id, p] of pending) {
      pending.delete(id)
      p.reject(new Error('The computation process stopped; try again'))
    }
  })
  c.unref()
  c.channel?.unref()
  child = c
  return c
}

/**
 * Runs an impact analysis in a child process so that a long sweep does not hold up other users' requests.
 * COMPUTE_INLINE=1 computes in this process instead (useful for debugging).
 */
export function runImpactTask(task: ImpactTask): Promise<ReturnType<typeof computeImpact>> {
  if (process.env.COMPUTE_INLINE === '1') return Promise.resolve().then(() => computeImpact(task))
  return new Promise((resolve, reject) => {
    const id = nextId++
    pending.set(id, { resolve, reject })
    const c = worker()
    c.ref()
    c.channel?.ref()
    c.send({ id, task }, (err) => {
      if (err) {
        pending.delete(id)
        reject(err)
      }
    })
  }).finally(() => {
    if (pending.size === 0 && child) {
      child.unref()
      child.channel?.unref()
    }
  }) as Promise<ReturnType<typeof computeImpact>>
}

/** Stops the computation process (tests and shutdown). */
export function stopComputePool(): void {
  child?.kill()
  child = null
}
