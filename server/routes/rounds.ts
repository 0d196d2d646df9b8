import { Router } from 'express'
import type { PracticeResult } from '../../shared/api/rounds'
import { declarationSchema, emptySchema, invitationSchema, practiceSchema, roundSchema, roundUpdateSchema } from '../../shared/schemas/rounds'
import { currentUser } from '../auth/guards'
import type { AppContext } from '../context'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, studyAccess, accessVia, type StudyAccess } from '../services/access'
import { confirmEarlierDeclaration, roundEntry, saveDeclaration, savePractice } from '../services/invitations'
import { practiceFeedback } from '../services/practice'
import {
  addPanelMember, closeRound, createRound, getRound, listMyRounds, listRounds, openRound, removePanelMember,
  resendInvitation, revokeInvitation, roundProgress, roundRow, updateRound,
} from '../services/rounds'

/** Only the panel's experts enter a round; admins sit on no panel. */
function expertOnly(access: StudyAccess) {
  if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel enter a round')
}

/** Elicitation rounds: scheduling, panel and invitations (analysts); entry, declaration and practice (experts). */
export function roundsRouter(ctx: AppContext): Router {
  const { db } = ctx
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  const roundAccess = async (req: import('express').Request) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Round')
    const access = await accessVia(db, user, 'rounds', id, 'Round')
    return { id, access }
  }

  r.get('/studies/:id/rounds', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    res.json(await listRounds(db, access))
  })

  r.post('/studies/:id/rounds', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(roundSchema, req.body)
    const id = await createRound(db, access.user, access.studyId, body)
    res.status(201).json(await getRound(db, access, id))
  })

  r.get('/my/rounds', async (req, res) => {
    res.json(await listMyRounds(db, currentUser(req)))
  })

  r.get('/rounds/:id', async (req, res) => {
    const { id, access } = await roundAccess(req)
    res.json(await getRound(db, access, id))
  })

  r.patch('/rounds/:id', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(roundUpdateSchema, req.body)
    await updateRound(db, access.user, id, body)
    res.json(await getRound(db, access, id))
  })

  r.post('/rounds/:id/open', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    await openRound(ctx, access.user, id)
    res.json(await getRound(db, access, id))
  })

  r.post('/rounds/:id/close', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    await closeRound(db, access.user, id)
    res.json(await getRound(db, access, id))
  })

  r.get('/rounds/:id/progress', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst', 'reviewer')
    res.json(await roundProgress(db, id))
  })

  r.post('/rounds/:id/invitations', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(invitationSchema, req.body)
    await addPanelMember(ctx, access.user, id, body)
    res.status(201).json(await getRound(db, access, id))
  })

  r.delete('/rounds/:id/panel/:panelId', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    await removePanelMember(db, access.user, id, idParam(req.params.panelId, 'Panel member'))
    res.json(await getRound(db, access, id))
  })

  r.post('/rounds/:id/panel/:panelId/resend', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    await resendInvitation(ctx, access.user, id, idParam(req.params.panelId, 'Panel member'))
    res.json(await getRound(db, access, id))
  })

  r.post('/rounds/:id/panel/:panelId/revoke', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    await revokeInvitation(db, access.user, id, idParam(req.params.panelId, 'Panel member'))
    res.json(await getRound(db, access, id))
  })

  // The expert's own entry into a round: declaration first, then the practice question.
  r.get('/rounds/:id/entry', async (req, res) => {
    const { id, access } = await roundAccess(req)
    expertOnly(access)
    res.json(await roundEntry(db, access.user, id))
  })

  r.put('/rounds/:id/declaration', async (req, res) => {
    const { id, access } = await roundAccess(req)
    expertOnly(access)
    const body = await validateBody(declarationSchema, req.body)
    res.json(await saveDeclaration(db, access.user, id, access.studyId, body))
  })

  // A later round of the same study: the expert's earlier declaration is still true.
  r.post('/rounds/:id/declaration/confirm', async (req, res) => {
    const { id, access } = await roundAccess(req)
    expertOnly(access)
    await validateBody(emptySchema, req.body ?? {})
    res.json(await confirmEarlierDeclaration(db, access.user, id, access.studyId))
  })

  r.post('/rounds/:id/practice', async (req, res) => {
    const { id, access } = await roundAccess(req)
    expertOnly(access)
    const body = await validateBody(practiceSchema, req.body)
    const round = await roundRow(db, id)
    const feedback = practiceFeedback(body.points, round.practice_answer)
    const entry = await savePractice(db, access.user, id, access.studyId, body.points, feedback)
    res.json({ ...entry, feedback } satisfies PracticeResult)
  })

  return r
}
