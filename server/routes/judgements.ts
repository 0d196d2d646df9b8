import { Router, type Request } from 'express'
import { calibrationAnswerSchema, judgementSchema, reopenSchema } from '../../shared/schemas/judgements'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError, idParam, validateBody } from '../http/errors'
import { allow, canAnalyse, studyAccess, accessVia } from '../services/access'
import { recordAudit } from '../services/audit'
import {
  feedbackFor, judgementHistory, listCalibrationAnswers, listJudgements, reopenSubmission, saveCalibrationAnswer, saveJudgement, submitRound,
} from '../services/judgements'
import { assertExpertOpens, roundRow } from '../services/rounds'

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
    const { id, access } = await roundAccess(req)
    allow(access, 'expert')
    if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel answer')
    const body = await validateBody(judgementSchema, req.body)
    const { judgement, fits, complete, fitMessage } = await saveJudgement(db, access.user, id, idParam(req.params.quantityId, 'Quantity'), body)
    res.json({ judgement, fits, complete, fitMessage })
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
    const user = currentUser(req)
    const jid = idParam(req.params.id, 'Judgement')
    const j = await db('judgements as j').join('rounds as r', 'r.id', 'j.round_id').where('j.id', jid).first('j.expert_id', 'r.study_id')
    if (!j) throw new HttpError(404, 'Judgement not found')
    const access = await studyAccess(db, user, j.study_id)
    if (!canAnalyse(access) && access.role !== 'reviewer' && j.expert_id !== user.id) throw new HttpError(403, 'You can only see your own answers')
    res.json(await judgementHistory(db, jid))
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
    await assertExpertOpens(db, access.user, await roundRow(db, id))
    await recordAudit(db, { actorId: access.user.id, studyId: access.studyId, action: 'feedback.view', subject: `round:${id}` })
    res.json(await feedbackFor(db, access.user, id))
  })

  return r
}
