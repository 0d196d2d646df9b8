// A compute thread: runs impact analyses off the event loop of the process that works the queue, so that its
// progress reports, its database writes and (in the web process) other users' requests carry on meanwhile.
import { setPriority } from 'node:os'
import { parentPort } from 'node:worker_threads'
import { EngineInputError } from '../../shared/stats/index'
import { computeImpact, type ImpactTask } from './tasks'
import type { ThreadReply, ThreadRequest } from './threads'

// On Linux a thread has a nice value of its own: below the process's other threads (the web process's requests, the
// worker's queue and database work) in the scheduler's order. Where that is not permitted it runs at normal priority.
try {
  setPriority(10)
} catch {
  // not permitted here
}

const port = parentPort!
port.on('message', ({ id, task }: ThreadRequest) => {
  const reply = (m: ThreadReply) => port.postMessage(m)
  try {
    const result = computeImpact(task as ImpactTask, (done) => reply({ id, progress: done }))
    reply({ id, ok: true, result })
  } catch (err) {
    const e = err as Error
    reply({ id, ok: false, error: { message: e.message, field: err instanceof EngineInputError ? err.field : undefined, engine: err instanceof EngineInputError } })
  }
})
port.postMessage({ ready: true } satisfies ThreadReply)
