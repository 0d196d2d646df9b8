import { Router } from 'express'
import { currentUser, requireAuth } from '../auth/guards'
import type { Db } from '../db/knex'
import { listStudiesFor } from '../services/studies'

export function studiesRouter(db: Db): Router {
  const r = Router()
  r.use(requireAuth)

  r.get('/', async (req, res) => {
    res.json(await listStudiesFor(db, currentUser(req)))
  })

  return r
}
