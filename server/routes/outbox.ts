import { Router } from 'express'
import { currentUser, requireAuth } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { listOutbox } from '../mail/outbox'
import { allow, studyAccess } from '../services/access'
import { studyExpertLabels } from '../services/expert-labels'

/** The study's outgoing e-mail with delivery status, for its analysts. */
export function outboxRouter(db: Db): Router {
  const r = Router()
  r.get('/studies/:id/outbox', requireAuth, async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const labels = await studyExpertLabels(db, access.studyId)
    res.json((await listOutbox(db, { studyId: access.studyId })).map((m) => ({ ...m, expertLabel: labels.ofAddress(m.to) })))
  })
  return r
}
