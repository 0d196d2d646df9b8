import { Router } from 'express'
import { EVIDENCE_EXTENSIONS, EVIDENCE_MAX_BYTES, nameFitsType, quantitySchema, quantityUpdateSchema } from '../../shared/schemas/quantities'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { fileReceiver } from '../http/upload'
import { allow, studyAccess, accessVia } from '../services/access'
import { addEvidenceFile, createQuantity, deleteEvidenceFile, getEvidenceFile, getQuantity, listQuantities, updateQuantity } from '../services/quantities'

const receiveFile = fileReceiver({ maxBytes: EVIDENCE_MAX_BYTES, fields: 5, tooLarge: 'Files may be at most 5 MB' })

/** Quantities of a study and their evidence files. */
export function quantitiesRouter(db: Db): Router {
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  r.get('/studies/:id/quantities', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    res.json(await listQuantities(db, access.studyId))
  })

  r.post('/studies/:id/quantities', async (req, res) => {
    const access = await studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
    allow(access, 'analyst')
    const body = await validateBody(quantitySchema, req.body)
    res.status(201).json(await createQuantity(db, access.user, access.studyId, body))
  })

  r.get('/quantities/:id', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    await accessVia(db, user, 'quantities', id, 'Quantity')
    res.json(await getQuantity(db, id))
  })

  r.patch('/quantities/:id', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    const body = await validateBody(quantityUpdateSchema, req.body)
    res.json(await updateQuantity(db, access.user, id, body))
  })

  r.post('/quantities/:id/files', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Quantity')
    const access = await accessVia(db, user, 'quantities', id, 'Quantity')
    allow(access, 'analyst')
    await receiveFile(req, res)
    if (!req.file) throw new HttpError(400, 'Choose a file to upload', { file: 'Choose a file to upload' })
    res.status(201).json(await addEvidenceFile(db, access.user, id, req.file))
  })

  // Served only to members of the file's study, as a download so the browser never renders it in the app's origin.
  r.get('/files/:id', async (req, res) => {
    const user = currentUser(req)
    const file = await getEvidenceFile(db, idParam(req.params.id, 'File'))
    await studyAccess(db, user, file.study_id)
    // Served under a name ending as its sniffed type does (files stored before that rule get the ending added).
    const filename = nameFitsType(file.filename, file.mime_type) ? file.filename : `${file.filename}${EVIDENCE_EXTENSIONS[file.mime_type]?.[0] ?? '.bin'}`
    res.setHeader('Content-Type', file.mime_type)
    res.setHeader('Content-Disposition', `attachment; filename*=UTF-8''${encodeURIComponent(filename)}`)
    res.setHeader('X-Content-Type-Options', 'nosniff')
    res.send(file.content)
  })

  r.delete('/files/:id', async (req, res) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'File')
    const file = await getEvidenceFile(db, id)
    const access = await studyAccess(db, user, file.study_id)
    allow(access, 'analyst')
    await deleteEvidenceFile(db, access.user, id)
    res.status(204).end()
  })

  return r
}
