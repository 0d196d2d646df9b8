import { Router } from 'express'
import { calibrationQuestionSchema, calibrationQuestionUpdateSchema } from '../../shared/schemas/quantities'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, canAnalyse, studyAccess, accessVia } from '../services/access'
import { createCalibrationQuestion, listCalibrationQuestions, updateCalibrationQuestion } from '../services/quantities'

/** Calibration questions; true values are never sent to experts. */
export function calibrationRouter(db: Db): Router {
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  r.get('/studies/:id/calibration-questions', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    res.json(await listCalibrationQuestions(db, access.studyId, canAnalyse(access) || access.role === 'reviewer'))
  })

  r.post('/studies/:id/calibration-questions', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(calibrationQuestionSchema, req.body)
    res.status(201).json(await createCalibrationQuestion(db, access.user, access.studyId, body))
  })

  r.patch('/calibration-questions/:id', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Calibration question')
    const access = await accessVia(db, user, 'calibration_questions', id, 'Calibration question')
    allow(access, 'analyst')
    const body = await validateBody(calibrationQuestionUpdateSchema, req.body)
    res.json(await updateCalibrationQuestion(db, access.user, id, body))
  })

  return r
}
