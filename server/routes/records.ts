import { Router, type Request } from 'express'
import type { RecordExport } from '../../shared/api/records'
import {
  recordChartSchema, recordCommentSchema, recordExclusionSchema, recordReturnSchema, recordSettingsSchema, recordSubmitSchema,
} from '../../shared/schemas/records'
import { currentUser } from '../auth/guards'
import { recordDocx } from '../export/docx'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { allow, studyAccess } from '../services/access'
import {
  addComment, excludeQuantity, getRecord, includeQuantity, newVersion, recordForExport, returnRecord, saveChart, setShowNames, signOffRecord, submitRecord,
  type RecordContext,
} from '../services/records'

function versionQuery(req: Request): number | undefined {
  if (req.query.version === undefined) return undefined
  const v = Number(req.query.version)
  if (!Number.isSafeInteger(v) || v < 1) throw new HttpError(400, 'version must be a positive whole number', { version: 'Must be a positive whole number' })
  return v
}

const fileSafe = (s: string) => s.replace(/[^A-Za-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || 'study'

/** The prior record: review, sign-off and exports; dates in exports and e-mails are written in `ctx.timeZone`. */
export function recordsRouter(ctx: RecordContext): Router {
  const { db } = ctx
  const r = Router()
  const access = async (req: Request) => studyAccess(db, currentUser(req), idParam(req.params.id, 'Study'))
  // The record holds the calibration true values and every expert's answers and rationales, open rounds included:
  // it is for the study's analysts and reviewers (admins pass); experts see their own answers on their rounds.
  const readerAccess = async (req: Request) => {
    const a = await access(req)
    if (a.role !== 'admin' && a.role !== 'analyst' && a.role !== 'reviewer') throw new HttpError(403, 'The prior record is for the study’s analysts and reviewers')
    return a
  }

  r.get('/studies/:id/record', async (req, res) => {
    res.json(await getRecord(db, await readerAccess(req), versionQuery(req)))
  })

  r.get('/studies/:id/record.json', async (req, res) => {
    const a = await readerAccess(req)
    const { content, meta } = await recordForExport(db, a.studyId, versionQuery(req))
    res.setHeader('Content-Disposition', `attachment; filename="prior-record-v${meta.version}.json"`)
    res.json({ ...content, record: meta } satisfies RecordExport)
  })

  r.get('/studies/:id/record.docx', async (req, res) => {
    const a = await readerAccess(req)
    const version = versionQuery(req)
    const { content, meta, charts } = await recordForExport(db, a.studyId, version)
    const view = await getRecord(db, a, version)
    const buffer = await recordDocx(content as Record<string, any>, meta, charts, view.comments, view.changeHistory, { timeZone: ctx.timeZone })
    res.setHeader('Content-Type', 'application/vnd.openxmlformats-officedocument.wordprocessingml.document')
    res.setHeader('Content-Disposition', `attachment; filename="prior-record-${fileSafe(String((content as any).study.title))}-v${meta.version}.docx"`)
    res.send(buffer)
  })

  r.patch('/studies/:id/record', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    const body = await validateBody(recordSettingsSchema, req.body)
    await setShowNames(db, a.user, a.studyId, body.showNames)
    res.json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/submit', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    const body = await validateBody(recordSubmitSchema, req.body ?? {})
    await submitRecord(ctx, a.user, a.studyId, body)
    res.json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/return', async (req, res) => {
    const a = await access(req)
    if (a.role !== 'reviewer') throw new HttpError(403, 'Only a reviewer of this study returns the record')
    const body = await validateBody(recordReturnSchema, req.body)
    await returnRecord(ctx, a.user, a.studyId, body.comment, body.section)
    res.json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/sign-off', async (req, res) => {
    const a = await access(req)
    if (a.role !== 'reviewer') throw new HttpError(403, 'Only a reviewer of this study signs off the record')
    await signOffRecord(ctx, a.user, a.studyId)
    res.json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/comments', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst', 'reviewer')
    const body = await validateBody(recordCommentSchema, req.body)
    await addComment(db, a.user, a.studyId, body.section, body.body)
    res.status(201).json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/exclusions', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    const body = await validateBody(recordExclusionSchema, req.body)
    await excludeQuantity(db, a.user, a.studyId, body.quantityId, body.reason)
    res.status(201).json(await getRecord(db, a))
  })

  r.delete('/studies/:id/record/exclusions/:quantityId', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    await includeQuantity(db, a.user, a.studyId, idParam(req.params.quantityId, 'Quantity'))
    res.json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/new-version', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    await newVersion(db, a.user, a.studyId)
    res.status(201).json(await getRecord(db, a))
  })

  r.post('/studies/:id/record/charts', async (req, res) => {
    const a = await access(req)
    allow(a, 'analyst')
    const body = await validateBody(recordChartSchema, req.body)
    const png = Buffer.from(body.png.slice('data:image/png;base64,'.length), 'base64')
    if (png.subarray(0, 8).toString('hex') !== '89504e470d0a1a0a') throw new HttpError(400, 'Not a PNG image', { png: 'Send the chart as a PNG data URL' })
    await saveChart(db, a.user, a.studyId, body.symbol, png)
    res.status(204).end()
  })

  return r
}
