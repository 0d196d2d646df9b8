import { Router } from 'express'
import type { HealthStatus } from '../../shared/api/users'
import type { Db } from '../db/knex'

export function healthRouter(db: Db): Router {
  const r = Router()
  r.get('/', async (_req, res) => {
    let dbUp = false
    try {
      await db.raw('SELECT 1')
      dbUp = true
    } catch {
      dbUp = false
    }
    res.status(dbUp ? 200 : 503).json({ ok: dbUp, db: dbUp } satisfies HealthStatus)
  })
  return r
}
