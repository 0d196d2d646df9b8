import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { Worker } from 'node:worker_threads'
import { EngineInputError } from '../../shared/stats/index'
import type { ImpactComputation } from '../../shared/api/impact'
import type { ImpactTask, JointDrawsTask } from './tasks'

const ENTRY = path.join(path.dirname(fileURLToPath(import.meta.url)), 'thread-entry.mjs')

/** The work a compute thread does: an impact analysis, or the joint draws of a linked set as CSV text. */
export type ThreadWork = { kind: 'impact'; task: ImpactTask } | { kind: 'joint-draws'; task: JointDrawsTask }

export interface ThreadRequest {
  id: number
  work: ThreadWork
  /** One Int32 the worker sets to 1 to stop the analysis; the thread reads it after each step. */
  stop: SharedArrayBuffer
}

export type ThreadReply =
  | { ready: true }
  | { id: number; progress: number }
  | { id: number; ok: true; result: ImpactComputation | string }
  | { id: number; ok: false; error: { message: string; field?: string; engine: boolean; stopped?: boolean } }

/** An analysis that ran past its time limit; its thread was stopped. */
export class ComputeTimeout extends Error {}

/** An analysis stopped at a step because its signal was aborted (the job was cancelled); the thread stays for the next one. */
export class ComputeCancelled extends Error {
  constructor() {
    super('The analysis was cancelled')
  }
}

interface Running {
  id: number
  resolve(result: ImpactComputation | string): void
  reject(err: Error): void
  onProgress(done: number): void
}

/**
 * One compute thread (server/compute/thread.ts), started once and kept for the next piece of work, one at a time (work
 * asked for meanwhile waits its turn). Work past its time limit stops the thread; the next starts a new thread.
 */
export class ComputeThread {
  private worker: Worker | null = null
  private ready: Promise<void> | null = null
  private running: Running | null = null
  private nextId = 1
  private turn: Promise<unknown> = Promise.resolve()

  /** Starts the thread (loading the engine takes a moment) unless it runs. */
  start(): Promise<void> {
    if (this.ready) return this.ready
    const worker = new Worker(ENTRY)
    this.worker = worker
    this.ready = new Promise<void>((resolve, reject) => {
      worker.on('message', (m: ThreadReply) => {
        if ('ready' in m) return resolve()
        const r = this.running
        if (!r || r.id !== m.id) return
        if ('progress' in m) return r.onProgress(m.progress)
        this.running = null
        if (m.ok) r.resolve(m.result)
        else if (m.error.stopped) r.reject(new ComputeCancelled())
        else r.reject(m.error.engine ? new EngineInputError(m.error.field ?? 'input', m.error.message) : new Error(m.error.message))
      })
      const gone = (err: Error) => {
        if (this.worker === worker) {
          this.worker = null
          this.ready = null
        }
        reject(err)
        const r = this.running
        this.running = null
        r?.reject(err)
      }
      worker.on('error', (err) => gone(new Error(`The computation thread failed: ${err.message}`)))
      worker.on('exit', (code) => gone(new Error(`The computation thread stopped (exit code ${code})`)))
    })
    return this.ready
  }

  /**
   * Runs one analysis; rejects with EngineInputError for inputs the engine refuses, ComputeTimeout past `timeoutMs`,
   * ComputeCancelled at the first step after `signal` aborts.
   */
  run(task: ImpactTask, onProgress: (done: number) => void, timeoutMs: number, signal?: AbortSignal): Promise<ImpactComputation> {
    return this.queued({ kind: 'impact', task }, onProgress, timeoutMs, signal) as Promise<ImpactComputation>
  }

  /** The CSV text of a linked set's joint draws (computeJointDraws), off the event loop of the process that asks. */
  jointDraws(task: JointDrawsTask, timeoutMs: number): Promise<string> {
    return this.queued({ kind: 'joint-draws', task }, () => {}, timeoutMs) as Promise<string>
  }

  /** Runs the work once the work before it has settled. */
  private queued(work: ThreadWork, onProgress: (done: number) => void, timeoutMs: number, signal?: AbortSignal): Promise<ImpactComputation | string> {
    const next = this.turn.then(() => this.execute(work, onProgress, timeoutMs, signal))
    this.turn = next.catch(() => {})
    return next
  }

  private async execute(work: ThreadWork, onProgress: (done: number) => void, timeoutMs: number, signal?: AbortSignal): Promise<ImpactComputation | string> {
    await this.start()
    const worker = this.worker!
    const id = this.nextId++
    const stop = new SharedArrayBuffer(4)
    const raise = () => Atomics.store(new Int32Array(stop), 0, 1)
    if (signal?.aborted) raise()
    else signal?.addEventListener('abort', raise, { once: true })
    return new Promise<ImpactComputation | string>((resolve, reject) => {
      const timer = setTimeout(() => {
        if (this.running?.id !== id) return
        this.running = null
        reject(new ComputeTimeout(`The ${work.kind === 'impact' ? 'analysis' : 'computation'} took longer than ${Math.round(timeoutMs / 1000)} s and was stopped`))
        void this.stop()
      }, timeoutMs)
      const settle = <T>(f: (v: T) => void) => (v: T) => {
        clearTimeout(timer)
        signal?.removeEventListener('abort', raise)
        f(v)
      }
      this.running = { id, resolve: settle(resolve), reject: settle(reject), onProgress }
      worker.postMessage({ id, work, stop } satisfies ThreadRequest)
    })
  }

  /** Stops the thread; an analysis still running is rejected. */
  async stop(): Promise<void> {
    const worker = this.worker
    this.worker = null
    this.ready = null
    if (worker) await worker.terminate()
  }
}
