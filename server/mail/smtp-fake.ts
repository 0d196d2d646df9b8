import type { AddressInfo } from 'node:net'
import { simpleParser, type AddressObject } from 'mailparser'
import { SMTPServer } from 'smtp-server'

/** One message the local fake received, parsed. */
export interface FakeMessage {
  id: number
  /** Envelope recipients (RCPT TO), comma separated. */
  to: string
  /** The To header as written by the sender, e.g. `Ann Example <ann@example.org>`. */
  toHeader: string
  from: string
  subject: string
  text: string
  html?: string
  messageId?: string
  attachments: { filename: string; contentType: string; content: string }[]
  receivedAt: string
}

export interface SmtpFake {
  /** The port the fake listens on (the one chosen when started with port 0); restarts reuse it. */
  readonly port: number
  readonly host: string
  readonly running: boolean
  /** Received messages, oldest first. */
  readonly messages: FakeMessage[]
  /** Starts again on the same port after stop(); no-op while running. */
  start(): Promise<void>
  /** Stops accepting connections (open sessions are cut after a short grace period); keeps the messages. */
  stop(): Promise<void>
  /** Forgets every received message. */
  clear(): void
}

export interface SmtpFakeOptions {
  port?: number
  host?: '127.0.0.1'
  /** Oldest messages are dropped beyond this many (default 1000), so a long dev session cannot grow without bound. */
  maxMessages?: number
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return ''
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ')
}

/**
 * A local SMTP server for development and tests: accepts every message without authentication
 * or TLS, on 127.0.0.1 only, and keeps the parsed messages in memory.
 */
export async function startSmtpFake(options: SmtpFakeOptions = {}): Promise<SmtpFake> {
  const host = options.host ?? '127.0.0.1'
  const maxMessages = options.maxMessages ?? 1000
  const messages: FakeMessage[] = []
  let port = options.port ?? 0
  let server: SMTPServer | null = null
  let nextId = 1

  const createServer = () =>
    new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      banner: 'Priorsmith local mail fake',
      size: 10 * 1024 * 1024,
      closeTimeout: 1000,
      onData(stream, session, callback) {
        simpleParser(stream)
          .then((mail) => {
            const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(', ')
            messages.push({
              id: nextId++,
              to: envelopeTo,
              toHeader: addressText(mail.to),
              from: addressText(mail.from),
              subject: mail.subject ?? '',
              text: mail.text ?? '',
              ...(mail.html ? { html: mail.html } : {}),
              ...(mail.messageId ? { messageId: mail.messageId } : {}),
              attachments: mail.attachments.map((a) => ({
                filename: a.filename ?? 'attachment',
                contentType: a.contentType,
                content: a.content.toString('utf8'),
              })),
              receivedAt: new Date().toISOString(),
            })
            if (messages.length > maxMessages) messages.splice(0, messages.length - maxMessages)
            callback()
          })
          .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))))
      },
    })

  const fake: SmtpFake = {
    get port() {
      return port
    },
    host,
    get running() {
      return server !== null
    },
    messages,
    async start() {
      if (server) return
      const s = createServer()
      // A server-level error (e.g. a broken socket) must not crash the app; it is logged.
      s.on('error', (err) => {
        if (server === s) console.error('[mail fake]', err.message)
      })
      await new Promise<void>((resolve, reject) => {
        const onError = (err: Error) => reject(err)
        s.server.once('error', onError)
        s.listen(port, host, () => {
          s.server.off('error', onError)
          resolve()
        })
      })
      port = (s.server.address() as AddressInfo).port
      server = s
    },
    async stop() {
      const s = server
      if (!s) return
      server = null
      await new Promise<void>((resolve) => s.close(() => resolve()))
    },
    clear() {
      messages.splice(0, messages.length)
    },
  }
  await fake.start()
  return fake
}
