import { Router } from 'express'
import { impactNotRunSchema, impactSchema } from '../../shared/schemas/impact'
import { currentUser } from '../auth/guards'
import type { AnalysisQueue } from '../compute/analysis-queue'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, accessVia } from '../services/access'
import { latestImpact, recordImpactNotRun, submitImpact, type ImpactInput } from '../services/impact'
import { activeImpactJobs, cancelImpactJob, findImpactJob, toImpactJob } from '../services/impact-jobs'

/** What each candidate prior does to the posterior and to the evidence on pilot data. */
export function impactRouter(db: Db, queue: AnalysisQueue): Router {
  const r = Router()

  // Answers at once: 202 with the queued job (follow it at its Location), or 200 with a job already done when the
  // same inputs were analysed before.
  r.post('/quantities/:id/impact', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    const body = (await validateBody(impactSchema, req.body)) as ImpactInput
    const { job, queued } = await submitImpact(db, queue, access.user, id, body)
    res.status(queued ? 202 : 200).location(`/api/impact-jobs/${job.id}`).json(await toImpactJob(db, job))
  })

  // A job is read by those who may read the quantity's analyses, whoever asked for it.
  r.get('/impact-jobs/:id', async (req, res) => {
    const user = currentUser(req)
    const job = await findImpactJob(db, String(req.params.id))
    if (!job) throw new HttpError(404, 'Analysis job not found')
    const access = await accessVia(db, user, 'quantities', job.quantity_id, 'Analysis job')
    allow(access, 'analyst', 'reviewer')
    res.json(await toImpactJob(db, job))
  })

  // An analyst stops a queued or running job; it stores nothing. 409 once it has finished.
  r.post('/impact-jobs/:id/cancel', async (req, res) => {
    const user = currentUser(req)
    const job = await findImpactJob(db, String(req.params.id))
    if (!job) throw new HttpError(404, 'Analysis job not found')
    const access = await accessVia(db, user, 'quantities', job.quantity_id, 'Analysis job')
    allow(access, 'analyst')
    res.json(await toImpactJob(db, await cancelImpactJob(db, access.user, job, access.studyId)))
  })

  // The quantity's analyses still queued or running, newest first: a page opened again follows them.
  r.get('/quantities/:id/impact-jobs/active', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst', 'reviewer')
    res.json(await activeImpactJobs(db, id))
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
