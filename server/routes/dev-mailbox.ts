import { Router, type RequestHandler } from 'express'
import { requireRole } from '../auth/guards'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import type { MailboxMessage, MailboxMessageDetail } from '../../shared/api/mailbox'
import type { FakeMessage, SmtpFake } from '../mail/smtp-fake'

/**
 * The local mail fake's inbox, for development and tests (mounted at /api/dev/mailbox).
 * Admin only; 404 when no fake runs (production sends through a real SMTP server).
 */
export function devMailboxRouter(fake: SmtpFake | null): Router {
  const router = Router()
  router.use(requireRole('admin'))

  const running: RequestHandler = (_req, res, next) => {
    if (!fake || !fake.running) return next(new HttpError(404, 'The local mail fake is not running'))
    res.set('Cache-Control', 'no-store')
    next()
  }

  const summary = (m: FakeMessage): MailboxMessage => ({
    id: m.id,
    to: m.to,
    from: m.from,
    subject: m.subject,
    text: m.text,
    ...(m.html !== undefined ? { html: m.html } : {}),
    receivedAt: m.receivedAt,
    attachments: m.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType })),
  })

  router.get('/', running, (_req, res) => {
    res.json([...fake!.messages].reverse().map(summary))
  })

  router.get('/:id', running, (req, res) => {
    const id = idParam(String(req.params.id), 'Message')
    const m = fake!.messages.find((x) => x.id === id)
    if (!m) throw new HttpError(404, 'Message not found')
    res.json({ ...summary(m), toHeader: m.toHeader, messageId: m.messageId ?? null, attachments: m.attachments } satisfies MailboxMessageDetail)
  })

  return router
}
