import { Router } from 'express'
import { studyMemberSchema, studySchema, studyUpdateSchema } from '../../shared/schemas/studies'
import type { StudyRole } from '../../shared/types/index'
import { currentUser, requireAuth, requireRole } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, canAnalyse, studyAccess } from '../services/access'
import { addMember, createStudy, getStudyDetail, listStudiesFor, removeMember, studyAudit, updateStudy } from '../services/studies'

export function studiesRouter(db: Db): Router {
  const r = Router()
  r.use(requireAuth)

  r.get('/', async (req, res) => {
    res.json(await listStudiesFor(db, currentUser(req)))
  })

  r.post('/', requireRole('admin', 'analyst'), async (req, res) => {
    const body = await validateBody(studySchema, req.body)
    res.status(201).json(await createStudy(db, currentUser(req), body))
  })

  r.get('/:id', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    res.json(await getStudyDetail(db, access.user, access.studyId, access.role))
  })

  r.patch('/:id', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(studyUpdateSchema, req.body)
    res.json(await updateStudy(db, access.user, access.studyId, body))
  })

  r.post('/:id/members', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(studyMemberSchema, req.body)
    await addMember(db, access.user, access.studyId, body.userId, body.studyRole as StudyRole)
    res.status(201).json(await getStudyDetail(db, access.user, access.studyId, access.role))
  })

  r.delete('/:id/members/:userId', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    await removeMember(db, access.user, access.studyId, idParam(req.params.userId, 'Member'))
    res.status(204).end()
  })

  r.get('/:id/audit', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst', 'reviewer')
    res.json(await studyAudit(db, access.studyId, { withNames: canAnalyse(access) }))
  })

  return r
}
