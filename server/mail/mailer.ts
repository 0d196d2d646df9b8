import PgBoss from 'pg-boss'
import type { Transporter } from 'nodemailer'
import type { Db } from '../db/knex'
import { createQueueOnce, PGBOSS_SCHEMA } from '../queue/boss'
import { CALENDAR_CONTENT_TYPE } from './calendar'
import { OUTBOX_TABLE } from './outbox'
import { createTransport, type MailConfig } from './transport'

export const MAIL_QUEUE = 'deliver-mail'
export { PGBOSS_SCHEMA }

export interface MailerOptions {
  /** pg-boss opens its own small connection pool on this database. */
  databaseUrl: string
  db: Db
  transport: MailConfig
  /** Base delay before the first retry; later retries back off exponentially (pg-boss retryBackoff). Default 30. */
  retryDelaySeconds?: number
  /** Retries after the first attempt before a message is marked 'failed'. Default 12 (about 1.5 days with a 30 s base). */
  retryLimit?: number
  /** How often an idle worker looks for jobs. Default 2 (pg-boss minimum 0.5). */
  pollingIntervalSeconds?: number
  /** The sweeper's period, and the age a 'queued' row must reach before the sweeper re-kicks it. Default 30000. */
  sweepIntervalMs?: number
  /** Where delivery problems are reported. Default console.warn with a [mail] prefix. */
  log?: (message: string) => void
}

export type DeliveryOutcome = 'sent' | 'already-sent' | 'failed-earlier' | 'missing'

export interface Mailer {
  start(): Promise<void>
  stop(): Promise<void>
  /** Wakes the worker for outbox rows just committed; never throws (the sweeper covers a lost kick). */
  kick(ids: number[]): Promise<void>
  /** Delivers one row right now, outside the queue; throws the SMTP error after recording it on the row. */
  deliverNow(id: number): Promise<DeliveryOutcome>
}

interface DeliverJob {
  outboxId: number
}

/** Short, single-line error text for the outbox's last_error (never the whole stack or server transcript). */
function shortError(err: unknown): string {
  const e = err as { code?: string; responseCode?: number; message?: string }
  const parts = [e?.code, e?.responseCode, e?.message ?? String(err)].filter((x) => x !== undefined && x !== '')
  return parts.join(' ').replace(/\s+/g, ' ').slice(0, 300)
}

/** A stable Message-ID per outbox row: a retry after an unclear failure carries the same id, so receivers can drop the duplicate. */
function messageIdFor(row: { id: number; created_at: Date | string }, from: string): string {
  const domain = /@([^>\s]+)>?\s*$/.exec(from)?.[1] ?? 'priorsmith.local'
  return `<outbox-${row.id}-${new Date(row.created_at).getTime()}@${domain}>`
}

/**
 * Delivers outbox rows through pg-boss: one job per row, retried with exponential backoff. Any
 * number of app instances may run a mailer on the same database: the row lock and the status
 * check inside the delivery transaction make sure each message is handed to SMTP at most once
 * per successful delivery (a crash between SMTP acceptance and the commit can still repeat one).
 */
export function createMailer(opts: MailerOptions): Mailer {
  const { db } = opts
  const retryDelay = opts.retryDelaySeconds ?? 30
  const retryLimit = opts.retryLimit ?? 12
  const pollingIntervalSeconds = Math.max(0.5, opts.pollingIntervalSeconds ?? 2)
  const sweepIntervalMs = opts.sweepIntervalMs ?? 30000
  const log = opts.log ?? ((m: string) => console.warn(`[mail] ${m}`))

  let boss: PgBoss | null = null
  let transporter: Transporter | null = null
  let sweeper: NodeJS.Timeout | null = null
  let sweeping: Promise<void> | null = null

  function ensureTransport(): Transporter {
    transporter ??= createTransport(opts.transport)
    return transporter
  }

  /**
   * The delivery itself. In one transaction: lock the row, skip it when already sent or given up,
   * hand it to SMTP, record the outcome. On an SMTP error the attempt is recorded (and committed)
   * before the error is rethrown, so pg-boss schedules the retry.
   */
  async function deliver(id: number, finalAttempt: boolean): Promise<DeliveryOutcome> {
    const result = await db.transaction(async (trx) => {
      const row = await trx(OUTBOX_TABLE).where({ id }).forUpdate().first()
      if (!row) return { outcome: 'missing' as const }
      if (row.status === 'sent') return { outcome: 'already-sent' as const }
      if (row.status === 'failed') return { outcome: 'failed-earlier' as const }
      const messageId = messageIdFor(row, opts.transport.from)
      try {
        const info = await ensureTransport().sendMail({
          from: opts.transport.from,
          to: row.to_name ? { name: row.to_name, address: row.to_address } : row.to_address,
          subject: row.subject,
          text: row.text_body,
          ...(row.html_body ? { html: row.html_body } : {}),
          messageId,
          ...(row.ics ? { attachments: [{ filename: 'round.ics', content: row.ics, contentType: CALENDAR_CONTENT_TYPE }] } : {}),
        })
        await trx(OUTBOX_TABLE).where({ id }).update({
          status: 'sent',
          sent_at: trx.fn.now(),
          attempts: row.attempts + 1,
          last_error: null,
          message_id: (info.messageId as string | undefined) ?? messageId,
        })
        return { outcome: 'sent' as const }
      } catch (err) {
        await trx(OUTBOX_TABLE).where({ id }).update({
          status: finalAttempt ? 'failed' : 'queued',
          attempts: row.attempts + 1,
          last_error: shortError(err),
        })
        return { outcome: 'error' as const, err }
      }
    })
    if (result.outcome === 'error') throw result.err
    return result.outcome
  }

  /** Ids among `ids` that have no job waiting, backing off or running (so a kick never stacks a second live job). */
  async function withoutLiveJob(ids: number[]): Promise<number[]> {
    if (!ids.length) return []
    const keys = ids.map((id) => `mail-${id}`)
    const { rows } = await db.raw<{ rows: { singleton_key: string }[] }>(
      `SELECT singleton_key FROM ??.job WHERE name = ? AND state IN ('created', 'retry', 'active') AND singleton_key = ANY(?)`,
      [PGBOSS_SCHEMA, MAIL_QUEUE, keys],
    )
    const live = new Set(rows.map((r) => r.singleton_key))
    return ids.filter((id) => !live.has(`mail-${id}`))
  }

  async function kick(ids: number[]): Promise<void> {
    const b = boss
    if (!b) return // not started (or stopped): the sweeper of a running mailer delivers them
    try {
      const unique = [...new Set(ids.map(Number).filter((n) => Number.isSafeInteger(n) && n > 0))]
      for (const id of await withoutLiveJob(unique)) {
        // The 'short' queue policy keeps at most one waiting job per singleton key, across instances.
        await b.send(MAIL_QUEUE, { outboxId: id } satisfies DeliverJob, {
          singletonKey: `mail-${id}`,
          retryLimit,
          retryDelay,
          retryBackoff: true,
        })
      }
    } catch (err) {
      log(`could not queue delivery of outbox ${ids.join(', ')}: ${shortError(err)}; the sweeper will retry`)
    }
  }

  /** Re-kicks rows still 'queued' after a sweep period without a live job: a kick lost to a crash, a restart, a job that expired. */
  function sweep(): Promise<void> {
    sweeping ??= (async () => {
      try {
        const rows: { id: number }[] = await db(OUTBOX_TABLE)
          .select('id')
          .where('status', 'queued')
          .andWhere('created_at', '<', db.raw(`now() - make_interval(secs => ?)`, [sweepIntervalMs / 1000]))
          .orderBy('id')
          .limit(500)
        if (rows.length) await kick(rows.map((r) => r.id))
      } catch (err) {
        log(`outbox sweep failed: ${shortError(err)}`)
      } finally {
        sweeping = null
      }
    })()
    return sweeping
  }

  return {
    async start() {
      if (boss) return
      const b = new PgBoss({ connectionString: opts.databaseUrl, schema: PGBOSS_SCHEMA, max: 4, application_name: 'priorsmith-mailer' })
      b.on('error', (err) => log(`queue error: ${shortError(err)}`))
      await b.start()
      await createQueueOnce(db, b, { name: MAIL_QUEUE, policy: 'short', retryLimit, retryDelay, retryBackoff: true, expireInSeconds: 300 })
      await b.work<DeliverJob>(MAIL_QUEUE, { pollingIntervalSeconds, batchSize: 5, includeMetadata: true }, async (jobs) => {
        // Each job succeeds or fails on its own: a failed one is failed here (pg-boss schedules its
        // retry); pg-boss then completes only the jobs still active.
        await Promise.all(
          jobs.map(async (job) => {
            try {
              await deliver(job.data.outboxId, job.retryCount >= job.retryLimit)
            } catch (err) {
              log(`outbox ${job.data.outboxId}: attempt ${job.retryCount + 1} of ${job.retryLimit + 1} failed: ${shortError(err)}`)
              await b.fail(MAIL_QUEUE, job.id, { message: shortError(err) })
            }
          }),
        )
      })
      boss = b
      sweeper = setInterval(() => void sweep(), sweepIntervalMs)
      sweeper.unref()
      void sweep()
    },

    async stop() {
      if (sweeper) clearInterval(sweeper)
      sweeper = null
      const b = boss
      boss = null
      if (sweeping) await sweeping
      if (b) await b.stop({ graceful: true, wait: true, timeout: 15000 })
      transporter?.close()
      transporter = null
    },

    kick,

    deliverNow(id: number) {
      return deliver(id, false)
    },
  }
}
