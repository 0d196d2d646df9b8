import { describe, expect, it } from 'vitest'
import { DEFAULT_MAIL_FROM, localMailConfig, mailConfigFromEnv } from '../../../server/mail/transport'

describe('mailConfigFromEnv', () => {
  it('returns null without SMTP_HOST, so the caller starts the local fake', () => {
    expect(mailConfigFromEnv({})).toBeNull()
    expect(mailConfigFromEnv({ SMTP_HOST: '  ' })).toBeNull()
  })

  it('reads a real server with STARTTLS required by default', () => {
    expect(mailConfigFromEnv({ SMTP_HOST: 'smtp.example.org', SMTP_USER: 'u', SMTP_PASS: 'p', MAIL_FROM: 'Study <study@example.org>' })).toEqual({
      host: 'smtp.example.org', port: 587, secure: false, requireTLS: true, user: 'u', pass: 'p', from: 'Study <study@example.org>',
    })
  })

  it('uses port 465 with implicit TLS, and honours SMTP_PORT and SMTP_REQUIRE_TLS=0', () => {
    expect(mailConfigFromEnv({ SMTP_HOST: 'smtp.example.org', SMTP_SECURE: '1' })).toMatchObject({ port: 465, secure: true, requireTLS: false, from: DEFAULT_MAIL_FROM })
    expect(mailConfigFromEnv({ SMTP_HOST: 'relay.lan', SMTP_PORT: '25', SMTP_REQUIRE_TLS: '0' })).toMatchObject({ port: 25, secure: false, requireTLS: false })
  })

  it('rejects a bad port and half-set credentials with a clear message', () => {
    expect(() => mailConfigFromEnv({ SMTP_HOST: 'h', SMTP_PORT: 'abc' })).toThrow('SMTP_PORT must be a whole number from 1 to 65535; got "abc"')
    expect(() => mailConfigFromEnv({ SMTP_HOST: 'h', SMTP_USER: 'u' })).toThrow('Set both SMTP_USER and SMTP_PASS, or neither')
  })

  it('points the local config at 127.0.0.1 without TLS', () => {
    expect(localMailConfig(2525, {})).toEqual({ host: '127.0.0.1', port: 2525, secure: false, requireTLS: false, from: DEFAULT_MAIL_FROM })
  })
})
