import { Router, type Request } from 'express'
import { calibrationAnswerSchema, judgementSchema, reopenSchema } from '../../shared/schemas/judgements'
import type { JudgementSaved } from '../../shared/api/judgements'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idOrNull, idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { accessFromRow, allow, accessVia } from '../services/access'
import {
  feedbackFor, judgementHistory, listCalibrationAnswers, listJudgements, readForSave, reopenSubmission, saveCalibrationAnswer, saveJudgement, submitRound,
} from '../services/judgements'

/** Experts' answers: their own drafts and submission; analysts read everything and may reopen. */
export function judgementsRouter(db: Db): Router {
  const r = Router()

  const roundAccess = async (req: Request) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Round')
    const access = await accessVia(db, user, 'rounds', id, 'Round')
    return { id, access }
  }

  r.get('/rounds/:id/judgements', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst', 'expert', 'reviewer')
    res.json(await listJudgements(db, id, { user: access.user, seesAll: access.role !== 'expert' }))
  })

  r.put('/rounds/:id/judgements/:quantityId', async (req, res) => {
    // The autosave: the access check and everything the save reads come in one query, refused in roundAccess's order.
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Round')
    const read = await readForSave(db, user, id, idOrNull(req.params.quantityId))
    const access = accessFromRow(read, user, 'Round')
    allow(access, 'expert')
    if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel answer')
    const body = await validateBody(judgementSchema, req.body)
    const { judgement, fits, complete, fitMessage } = await saveJudgement(db, access.user, id, idParam(req.params.quantityId, 'Quantity'), body, read)
    res.json({ judgement, fits, complete, fitMessage } satisfies JudgementSaved)
  })

  r.post('/rounds/:id/submit', async (req, res) => {
    const { id, access } = await roundAccess(req)
    if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel submit')
    await submitRound(db, access.user, id)
    res.json(await listJudgements(db, id, { user: access.user, seesAll: false }))
  })

  r.post('/rounds/:id/reopen', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(reopenSchema, req.body)
    await reopenSubmission(db, access.user, id, body.expertId, body.reason)
    res.status(204).end()
  })

  r.get('/judgements/:id/history', async (req, res) => {
    res.json(await judgementHistory(db, currentUser(req), idParam(req.params.id, 'Judgement')))
  })

  r.get('/rounds/:id/calibration-answers', async (req, res) => {
    const { id, access } = await roundAccess(req)
    res.json(await listCalibrationAnswers(db, id, { user: access.user, seesAll: access.role !== 'expert' }))
  })

  r.put('/rounds/:id/calibration-answers/:questionId', async (req, res) => {
    const { id, access } = await roundAccess(req)
    if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel answer')
    const body = await validateBody(calibrationAnswerSchema, req.body)
    res.json(await saveCalibrationAnswer(db, access.user, id, idParam(req.params.questionId, 'Calibration question'), body))
  })

  r.get('/rounds/:id/feedback', async (req, res) => {
    const { id, access } = await roundAccess(req)
    if (access.role !== 'expert') throw new HttpError(403, 'Feedback is shown to the panel’s experts')
    res.json(await feedbackFor(db, access.user, id))
  })

  return r
}
