import { Router } from 'express'
import { reconciliationSchema } from '../../shared/schemas/reconciliation'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, accessVia } from '../services/access'
import { getReconciliation, saveReconciliation } from '../services/reconciliation'

function optionalNumber(v: unknown, field: string, min: number, max: number): number | undefined {
  if (v === undefined || v === '') return undefined
  const n = Number(v)
  if (!Number.isFinite(n) || n < min || n >= max) throw new HttpError(400, `${field} is out of range`, { [field]: `Must be from ${min} to below ${max}` })
  return n
}

/** The analyst's workspace for turning a panel's judgements into one prior per quantity. */
export function reconciliationRouter(db: Db): Router {
  const r = Router()

  r.get('/quantities/:id/reconciliation', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst', 'reviewer')
    const roundId = optionalNumber(req.query.roundId, 'roundId', 1, Number.MAX_SAFE_INTEGER)
    const cutoff = optionalNumber(req.query.cutoff, 'cutoff', 0, 1)
    res.json(await getReconciliation(db, id, { roundId, cutoff }))
  })

  r.put('/quantities/:id/reconciliation', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    const body = await validateBody(reconciliationSchema, req.body)
    res.json(await saveReconciliation(db, access.user, id, body))
  })

  return r
}
