// Child process that runs engine computations off the server's event loop (see pool.ts).
import { EngineInputError } from '../../shared/stats/index'
import { computeImpact, type ImpactTask } from './tasks'

process.on('message', (msg: { id: number; task: ImpactTask }) => {
  try {
    process.send!({ id: msg.id, ok: true, result: computeImpact(msg.task) })
  } catch (err) {
    const e = err as Error & { field?: string }
    process.send!({ id: msg.id, ok: false, error: { message: e.message, field: err instanceof EngineInputError ? e.field : undefined, engine: err instanceof EngineInputError } })
  }
})
