import { createRequire } from 'node:module'
import { Worker } from 'node:worker_threads'
import { HttpError } from '../http/http-error'

// bcrypt is CPU work by design (about 80 ms at cost 10). bcryptjs computes on the thread that calls it, in 100 ms
// slices, so a burst of sign-ins would stall every other request for that long at a time. Comparisons therefore run
// on a thread of their own, one at a time, with a bounded queue: a flood costs at most that thread.
const bcryptPath = createRequire(import.meta.url).resolve('bcryptjs')
const WORKER_SOURCE = `
const { parentPort } = require('node:worker_threads')
const bcrypt = require(${JSON.stringify(bcryptPath)})
parentPort.on('message', ({ id, password, hash }) => {
  let ok = false
  try { ok = bcrypt.compareSync(password, hash) } catch {}
  parentPort.postMessage({ id, ok })
})`
/**
 * Comparisons in hand at most (about a second of work at 80 ms each); more at once answer 429 at no cost, and those
 * refusals count towards the address's sign-in limit, so a flood reaches it within a second or two.
 */
const MAX_WAITING = 16

let worker: Worker | null = null
let nextId = 1
const pending = new Map<number, { resolve: (ok: boolean) => void; reject: (err: Error) => void }>()

function thread(): Worker {
  if (worker) return worker
  const w = new Worker(WORKER_SOURCE, { eval: true })
  w.on('message', ({ id, ok }: { id: number; ok: boolean }) => {
    pending.get(id)?.resolve(ok)
    pending.delete(id)
    if (pending.size === 0) w.unref()
  })
  w.on('error', (err) => {
    for (const p of pending.values()) p.reject(err)
    pending.clear()
    worker = null
  })
  w.on('exit', () => {
    if (worker === w) worker = null
  })
  worker = w
  return w
}

/** Whether `password` matches the bcrypt `hash`, computed off the request thread. */
export function checkPassword(password: string, hash: string): Promise<boolean> {
  if (pending.size >= MAX_WAITING) return Promise.reject(new HttpError(429, 'Too many sign-ins at this moment. Wait a few seconds and try again.'))
  return new Promise((resolve, reject) => {
    const id = nextId++
    pending.set(id, { resolve, reject })
    const w = thread()
    w.ref()
    w.postMessage({ id, password, hash })
  })
}
