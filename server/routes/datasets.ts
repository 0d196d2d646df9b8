import { Router } from 'express'
import { PILOT_MAX_BYTES } from '../../shared/elicitation/pilot'
import { pilotUploadSchema } from '../../shared/schemas/pilot'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { fileReceiver } from '../http/upload'
import { allow, studyAccess } from '../services/access'
import type { PilotUploadFields } from '../../shared/api/datasets'
import { createDataset, getDataset, listDatasets, previewCsv } from '../services/datasets'

const receiveFile = fileReceiver({ maxBytes: PILOT_MAX_BYTES, fields: 20, tooLarge: 'Pilot data files may be at most 2 MB.' })

/** Pilot data: CSV uploads mapped to a likelihood model, versioned per quantity. */
export function datasetsRouter(db: Db): Router {
  const r = Router()

  r.get('/studies/:id/datasets', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst', 'reviewer')
    res.json(await listDatasets(db, access.studyId))
  })

  r.post('/studies/:id/datasets/preview', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    await receiveFile(req, res)
    if (!req.file) throw new HttpError(400, 'Choose a CSV file', { file: 'Choose a CSV file' })
    const delimiter = [',', ';', '\t'].includes(req.body?.delimiter) ? req.body.delimiter : ','
    res.json(previewCsv(req.file.buffer, delimiter))
  })

  r.post('/studies/:id/datasets', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    await receiveFile(req, res)
    const fields = (await validateBody(pilotUploadSchema, { ...req.body })) as PilotUploadFields
    if (!req.file) throw new HttpError(400, 'Choose a CSV file', { file: 'Choose a CSV file' })
    res.status(201).json(await createDataset(db, access.user, access.studyId, fields, req.file))
  })

  r.get('/datasets/:id', async (req, res) => {
    const user = currentUser(req)
    const dataset = await getDataset(db, idParam(req.params.id, 'Dataset'))
    const access = await studyAccess(db, user, dataset.studyId)
    allow(access, 'analyst', 'reviewer')
    res.json(dataset)
  })

  return r
}
