import { Router, type Request } from 'express'
import { linkAnswerSchema, linkOrderSchema, linkSchema, linkUpdateSchema } from '../../shared/schemas/links'
import { currentUser } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { accessVia, allow } from '../services/access'
import {
  createLink, deleteLink, getLink, linkAnswerHistory, listLinkAnswers, reorderLinks, roundOfLink, saveLinkAnswer, updateLink,
} from '../services/links'

/** Links between two quantities of a round (analysts, while the round is a draft) and the experts' answers to them. */
export function linksRouter(db: Db): Router {
  const r = Router()
  // Mounted at /api: no router-wide guard, or unknown /api routes would answer 401; currentUser() guards each handler.

  const roundAccess = async (req: Request) => {
    const id = idParam(req.params.id, 'Round')
    return { id, access: await accessVia(db, currentUser(req), 'rounds', id, 'Round') }
  }
  const linkAccess = async (req: Request) => {
    const user = currentUser(req)
    const id = idParam(req.params.id, 'Link')
    return { id, access: await accessVia(db, user, 'rounds', await roundOfLink(db, id), 'Round') }
  }

  r.post('/rounds/:id/links', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(linkSchema, req.body)
    res.status(201).json(await createLink(db, access.user, id, body))
  })

  r.put('/rounds/:id/links/order', async (req, res) => {
    const { id, access } = await roundAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(linkOrderSchema, req.body)
    res.json(await reorderLinks(db, access.user, id, body.linkIds))
  })

  r.get('/links/:id', async (req, res) => {
    const { id, access } = await linkAccess(req)
    allow(access, 'analyst', 'reviewer')
    res.json(await getLink(db, id))
  })

  r.patch('/links/:id', async (req, res) => {
    const { id, access } = await linkAccess(req)
    allow(access, 'analyst')
    const body = await validateBody(linkUpdateSchema, req.body)
    res.json(await updateLink(db, access.user, id, body))
  })

  r.delete('/links/:id', async (req, res) => {
    const { id, access } = await linkAccess(req)
    allow(access, 'analyst')
    await deleteLink(db, access.user, id)
    res.status(204).end()
  })

  r.get('/rounds/:id/link-answers', async (req, res) => {
    const { id, access } = await roundAccess(req)
    res.json(await listLinkAnswers(db, id, { user: access.user, seesAll: access.role !== 'expert' }))
  })

  r.put('/rounds/:id/link-answers/:linkId', async (req, res) => {
    const { id, access } = await roundAccess(req)
    if (access.role !== 'expert') throw new HttpError(403, 'Only the experts on the panel answer')
    const body = await validateBody(linkAnswerSchema, req.body)
    res.json(await saveLinkAnswer(db, access.user, id, idParam(req.params.linkId, 'Link'), body))
  })

  r.get('/link-answers/:id/history', async (req, res) => {
    res.json(await linkAnswerHistory(db, currentUser(req), idParam(req.params.id, 'Answer')))
  })

  return r
}
