import { Router } from 'express'
import { jointDrawsSchema, linkReconciliationSchema } from '../../shared/schemas/link-reconciliation'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { accessVia, allow, studyAccess } from '../services/access'
import { decideLink, jointDrawsCsv, studyLinkedQuantities, type JointDrawsComputer } from '../services/link-reconciliation'
import { roundOfLink } from '../services/links'

/** Links at reconciliation: the pooled correlations, the analyst's decisions, the linked sets' matrices and joint draws. */
export function linkReconciliationRouter(db: Db, computeDraws: JointDrawsComputer): Router {
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  // The experts' answers with their names and the joint prior are the study team's, as a quantity's reconciliation.
  r.get('/studies/:id/linked-quantities', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst', 'reviewer')
    res.json(await studyLinkedQuantities(db, access.studyId))
  })

  r.put('/links/:id/reconciliation', async (req, res) => {
    const id = idParam(req.params.id, 'Link')
    const access = await accessVia(db, currentUser(req), 'rounds', await roundOfLink(db, id), 'Link')
    allow(access, 'analyst')
    const body = await validateBody(linkReconciliationSchema, req.body)
    res.json(await decideLink(db, access.user, access.studyId, id, body))
  })

  r.get('/quantities/:id/joint-draws', async (req, res) => {
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, currentUser(req), 'quantities', id, 'Quantity')
    allow(access, 'analyst', 'reviewer')
    const query = await validateBody(jointDrawsSchema, req.query)
    const { csv, symbols } = await jointDrawsCsv(db, computeDraws, access.studyId, id, query)
    res.setHeader('Content-Type', 'text/csv; charset=utf-8')
    res.setHeader('Content-Disposition', `attachment; filename="joint-draws-${symbols.join('-').replace(/[^A-Za-z0-9_-]/g, '_')}-seed${query.seed}-n${query.n}.csv"`)
    res.send(csv)
  })

  return r
}
