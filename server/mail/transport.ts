import nodemailer, { type Transporter } from 'nodemailer'

export const DEFAULT_MAIL_FROM = 'Priorsmith <no-reply@priorsmith.local>'

/** Where outgoing mail is handed over (SMTP), and the From address it carries. */
export interface MailConfig {
  host: string
  port: number
  /** Implicit TLS (port 465). When false, nodemailer still upgrades with STARTTLS if the server offers it. */
  secure?: boolean
  /** Refuse to send unless STARTTLS succeeds (ignored with `secure`). Default: true for any host but the local fake. */
  requireTLS?: boolean
  user?: string
  pass?: string
  from: string
}

function intInRange(value: string, name: string, min: number, max: number): number {
  const n = Number(value)
  if (!Number.isInteger(n) || n < min || n > max) throw new Error(`${name} must be a whole number from ${min} to ${max}; got "${value}"`)
  return n
}

/**
 * Mail settings from SMTP_HOST, SMTP_PORT, SMTP_SECURE, SMTP_REQUIRE_TLS, SMTP_USER, SMTP_PASS and MAIL_FROM.
 * Returns null when SMTP_HOST is unset: the caller then starts the local mail fake
 * and uses `localMailConfig(fake.port, env)`.
 */
export function mailConfigFromEnv(env: NodeJS.ProcessEnv = process.env): MailConfig | null {
  const host = env.SMTP_HOST?.trim()
  if (!host) return null
  const secure = ['1', 'true', 'yes'].includes((env.SMTP_SECURE ?? '').trim().toLowerCase())
  const port = env.SMTP_PORT?.trim() ? intInRange(env.SMTP_PORT.trim(), 'SMTP_PORT', 1, 65535) : secure ? 465 : 587
  const user = env.SMTP_USER?.trim() || undefined
  const pass = env.SMTP_PASS || undefined
  if (!!user !== !!pass) throw new Error('Set both SMTP_USER and SMTP_PASS, or neither')
  // Without implicit TLS, insist on STARTTLS so credentials and invitation links never cross the network in clear,
  // unless SMTP_REQUIRE_TLS=0 (a relay on a trusted network that offers no TLS).
  const requireTLS = !secure && !['0', 'false', 'no'].includes((env.SMTP_REQUIRE_TLS ?? '').trim().toLowerCase())
  return { host, port, secure, requireTLS, user, pass, from: env.MAIL_FROM?.trim() || DEFAULT_MAIL_FROM }
}

/** Settings for the local mail fake on 127.0.0.1 (no TLS, no authentication). */
export function localMailConfig(port: number, env: NodeJS.ProcessEnv = process.env): MailConfig {
  return { host: '127.0.0.1', port, secure: false, requireTLS: false, from: env.MAIL_FROM?.trim() || DEFAULT_MAIL_FROM }
}

/** A nodemailer SMTP transport with short timeouts, so a mail server that is down fails fast and the queue retries later. */
export function createTransport(config: MailConfig): Transporter {
  const local = config.host === '127.0.0.1' || config.host === 'localhost'
  return nodemailer.createTransport({
    host: config.host,
    port: config.port,
    secure: !!config.secure,
    auth: config.user ? { user: config.user, pass: config.pass ?? '' } : undefined,
    // The local fake offers no TLS; elsewhere STARTTLS is used when offered, and demanded with requireTLS.
    ignoreTLS: local && !config.requireTLS,
    requireTLS: !config.secure && (config.requireTLS ?? !local),
    connectionTimeout: 3000,
    greetingTimeout: 3000,
    socketTimeout: 10000,
    dnsTimeout: 3000,
  })
}
