import { createHash, randomBytes } from 'node:crypto'

export const INVITATION_DAYS = 14

/** Invitation tokens are stored only as this hash. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

/** 256 random bits, URL-safe. */
export function newToken(): string {
  return randomBytes(32).toString('base64url')
}
