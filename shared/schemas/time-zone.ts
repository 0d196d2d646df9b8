import { string } from 'yup'

/**
 * The IANA name with the platform's capitals ("europe/london" → "Europe/London"), or null when it names no time
 * zone. A name the platform files under an older alias ("Asia/Kolkata") keeps the spelling given.
 */
export function canonicalTimeZone(name: unknown): string | null {
  if (typeof name !== 'string' || !/^[A-Za-z][A-Za-z0-9_+\-/]{0,63}$/.test(name.trim())) return null
  const given = name.trim()
  try {
    const resolved = new Intl.DateTimeFormat('en-GB', { timeZone: given }).resolvedOptions().timeZone
    return resolved.toLowerCase() === given.toLowerCase() ? resolved : given
  } catch {
    return null
  }
}

/** The time zone of the browser (or server) running this code; UTC when it cannot tell. */
export function localTimeZone(): string {
  return canonicalTimeZone(new Intl.DateTimeFormat().resolvedOptions().timeZone) ?? 'UTC'
}

const MESSAGE = 'Choose a time zone by its IANA name, such as Europe/London or America/New_York'

/** A round's time zone: an IANA name, stored as the platform spells it. */
export const timeZoneRule = string()
  .typeError(MESSAGE)
  .trim()
  .test('iana', MESSAGE, (v) => v === undefined || canonicalTimeZone(v) !== null)
  .transform((v: unknown) => (typeof v === 'string' ? (canonicalTimeZone(v) ?? v) : v))
