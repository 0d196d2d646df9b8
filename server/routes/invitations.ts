import { Router } from 'express'
import type { InvitationAccepted } from '../../shared/api/invitations'
import { acceptInvitationSchema } from '../../shared/schemas/rounds'
import type { Db } from '../db/knex'
import { validateBody } from '../http/validate-body'
import { acceptInvitation, describeInvitation } from '../services/invitations'

/** Reached from the e-mailed link, before the expert has an account. */
export function invitationsRouter(db: Db): Router {
  const r = Router()

  r.get('/:token', async (req, res) => {
    res.json(await describeInvitation(db, req.params.token))
  })

  r.post('/:token/accept', async (req, res, next) => {
    const body = await validateBody(acceptInvitationSchema, req.body)
    const { user, roundId } = await acceptInvitation(db, req.params.token, body)
    req.logIn(user, (err) => {
      if (err) return next(err)
      res.status(201).json({ user, roundId } satisfies InvitationAccepted)
    })
  })

  return r
}
