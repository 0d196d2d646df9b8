import { Router, type Request, type Response } from 'express'
import multer from 'multer'
import { PILOT_MAX_BYTES } from '../../shared/elicitation/pilot'
import { pilotUploadSchema } from '../../shared/schemas/pilot'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError, idParam, validateBody } from '../http/errors'
import { allow, studyAccess } from '../services/access'
import { createDataset, getDataset, listDatasets, previewCsv, type UploadFields } from '../services/datasets'

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: PILOT_MAX_BYTES, files: 1, fields: 20 } })

function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) => {
    upload.single('file')(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError) {
        const message = err.code === 'LIMIT_FILE_SIZE' ? 'Pilot data files may be at most 2 MB.' : `Upload refused: ${err.message}`
        reject(new HttpError(400, message, { file: message }))
      } else if (err) reject(err)
      else resolve()
    })
  })
}

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
    const fields = (await validateBody(pilotUploadSchema, { ...req.body })) as UploadFields
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
