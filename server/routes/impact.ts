import { Router } from 'express'
import { impactNotRunSchema, impactSchema } from '../../shared/schemas/impact'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, accessVia } from '../services/access'
import { latestImpact, recordImpactNotRun, runImpact, type ImpactInput } from '../services/impact'

/** What each candidate prior does to the posterior and to the evidence on pilot data. */
export function impactRouter(db: Db): Router {
  const r = Router()

  r.post('/quantities/:id/impact', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    const body = (await validateBody(impactSchema, req.body)) as ImpactInput
    res.json(await runImpact(db, access.user, id, body))
  })

  r.get('/quantities/:id/impact', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst', 'reviewer')
    res.json(await latestImpact(db, id))
  })

  r.put('/quantities/:id/impact/not-run', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    const body = await validateBody(impactNotRunSchema, req.body)
    res.json(await recordImpactNotRun(db, access.user, id, body.reason))
  })

  return r
}
