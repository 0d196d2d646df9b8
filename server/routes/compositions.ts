import { Router } from 'express'
import { compositionDatasetSchema, compositionImpactSchema, compositionSchema, compositionUpdateSchema } from '../../shared/schemas/compositions'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { accessVia, allow, studyAccess } from '../services/access'
import { createCompositionDataset, latestCompositionAnalysis, listCompositionDatasets, runCompositionImpact } from '../services/composition-pilot'
import { compositionDirichlet, createComposition, deleteComposition, getComposition, listCompositions, updateComposition } from '../services/compositions'

/** Compositions of a study: proportion quantities whose shares add up to one. */
export function compositionsRouter(db: Db): Router {
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  r.get('/studies/:id/compositions', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    res.json(await listCompositions(db, access.studyId))
  })

  r.post('/studies/:id/compositions', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(compositionSchema, req.body)
    res.status(201).json(await createComposition(db, access.user, access.studyId, body))
  })

  r.get('/compositions/:id', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    res.json(await getComposition(db, id))
  })

  r.patch('/compositions/:id', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    const access = await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    allow(access, 'analyst')
    const body = await validateBody(compositionUpdateSchema, req.body)
    res.json(await updateComposition(db, access.user, id, body))
  })

  // The joint prior is the analysts' and reviewers' (as the reconciliation it is built from).
  r.get('/compositions/:id/dirichlet', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    const access = await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    allow(access, 'analyst', 'reviewer')
    res.json(await compositionDirichlet(db, id))
  })

  r.get('/compositions/:id/datasets', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    allow(await accessVia(db, currentUser(req), 'compositions', id, 'Composition'), 'analyst', 'reviewer')
    res.json(await listCompositionDatasets(db, id))
  })

  r.post('/compositions/:id/datasets', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    const access = await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    allow(access, 'analyst')
    const body = await validateBody(compositionDatasetSchema, req.body)
    res.status(201).json(await createCompositionDataset(db, access.user, id, body))
  })

  r.get('/compositions/:id/impact', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    allow(await accessVia(db, currentUser(req), 'compositions', id, 'Composition'), 'analyst', 'reviewer')
    res.json({ analysis: await latestCompositionAnalysis(db, id) })
  })

  r.post('/compositions/:id/impact', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    const access = await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    allow(access, 'analyst')
    const body = await validateBody(compositionImpactSchema, req.body)
    res.status(201).json(await runCompositionImpact(db, access.user, id, body.datasetId))
  })

  r.delete('/compositions/:id', async (req, res) => {
    const id = idParam(req.params.id, 'Composition')
    const access = await accessVia(db, currentUser(req), 'compositions', id, 'Composition')
    allow(access, 'analyst')
    await deleteComposition(db, access.user, id)
    res.status(204).end()
  })

  return r
}
