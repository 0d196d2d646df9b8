// A compute thread: runs impact analyses (and a linked set's joint draws) off the event loop of the process that asks,
// so that its progress reports, its database writes and (in the web process) other users' requests carry on meanwhile.
import { setPriority } from 'node:os'
import { parentPort } from 'node:worker_threads'
import { EngineInputError } from '../../shared/stats/index'
import { computeImpact, computeJointDraws } from './tasks'
import type { ThreadReply, ThreadRequest } from './threads'

// On Linux a thread has a nice value of its own: below the process's other threads (the web process's requests, the
// worker's queue and database work) in the scheduler's order. Where that is not permitted it runs at normal priority.
try {
  setPriority(10)
} catch {
  // not permitted here
}

/** Thrown from a step's report when the worker asked to stop: unwinds the computation at that step. */
class Stopped extends Error {}

const port = parentPort!
port.on('message', ({ id, work, stop }: ThreadRequest) => {
  const reply = (m: ThreadReply) => port.postMessage(m)
  const stopFlag = new Int32Array(stop)
  try {
    const result = work.kind === 'impact'
      ? computeImpact(work.task, (done) => {
        if (Atomics.load(stopFlag, 0) === 1) throw new Stopped()
        reply({ id, progress: done })
      })
      : computeJointDraws(work.task)
    reply({ id, ok: true, result })
  } catch (err) {
    const e = err as Error
    reply({ id, ok: false, error: { message: e.message, field: err instanceof EngineInputError ? err.field : undefined, engine: err instanceof EngineInputError, stopped: err instanceof Stopped } })
  }
})
port.postMessage({ ready: true } satisfies ThreadReply)
