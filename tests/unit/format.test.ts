import { describe, expect, it } from 'vitest'
import {
  countNoun, describeDistribution, formatCount, formatExact, formatPercentPoints, FAMILY_LABELS, FAMILY_PARAMS, formatBytes, formatClockTime, formatDate, formatDateTime, formatNumber, formatPercent,
  formatProbability, formatProbabilityFromLog, formatRelativeTime, formatShortDateTime, formatSigned, formatTiny, formatValue, paramsText,
} from '../../shared/format'

// Expected strings are constructed by hand from the rules written at the head of shared/format/numbers.ts and dates.ts.
describe('numbers in tables, parameters and the record', () => {
  it('keeps 4 significant digits by default, or as many as asked, dropping trailing zeros', () => {
    expect([3.14159265, 10.2834, 0.123456, 2, 2.5, 100].map((x) => formatNumber(x))).toEqual(['3.142', '10.28', '0.1235', '2', '2.5', '100'])
    expect(formatNumber(3.14159265, 6)).toBe('3.14159')
    expect(formatNumber(0.953463, 6)).toBe('0.953463')
    expect(formatNumber(1 / 3, 2)).toBe('0.33')
  })

  it('never rounds away a digit of the whole-number part and groups no thousands', () => {
    expect(formatNumber(12345.6)).toBe('12346')
    expect(formatNumber(999999.4)).toBe('999999')
    expect(formatNumber(1234.5678, 6)).toBe('1234.57')
    expect(formatNumber(-4321.9)).toBe('-4322')
  })

  it('writes a million and more, and less than 0.0001, in exponent form with the same digits', () => {
    expect(formatNumber(1e6)).toBe('1e+6')
    expect(formatNumber(12345678)).toBe('1.235e+7')
    expect(formatNumber(-2.5e9, 6)).toBe('-2.5e+9')
    expect(formatNumber(0.0001)).toBe('0.0001')
    expect(formatNumber(0.00009876)).toBe('9.876e-5')
    expect(formatNumber(-3e-300)).toBe('-3e-300')
    expect(formatNumber(5e-324)).toBe('4.941e-324')
    expect(formatNumber(Number.MAX_VALUE, 3)).toBe('1.8e+308')
  })

  it('reads negative zero as 0, NaN and no value as —, and the infinities as ∞ with an ASCII minus', () => {
    expect(formatNumber(-0)).toBe('0')
    expect(formatNumber(0)).toBe('0')
    expect(formatNumber(-0.00004)).toBe('-4e-5')
    expect(formatNumber(Number.NaN)).toBe('—')
    expect(formatNumber(null)).toBe('—')
    expect(formatNumber(undefined)).toBe('—')
    expect(formatNumber(Infinity)).toBe('∞')
    expect(formatNumber(-Infinity)).toBe('-∞')
    expect(formatNumber(-1.5)).toBe('-1.5')
  })
})

describe('values in prose for experts', () => {
  it('keeps 3 significant digits, groups thousands and never writes an exponent', () => {
    expect([8.034, 0.25, 1840.4, 1234567, 0.000012345, -12.34, -0, 0].map(formatValue)).toEqual(['8.03', '0.25', '1,840', '1,234,567', '0.0000123', '-12.3', '0', '0'])
    expect([Number.NaN, null, Infinity, -Infinity].map(formatValue)).toEqual(['—', '—', '∞', '-∞'])
  })
})

describe('probabilities, weights and p-values', () => {
  it('are decimals with 3 significant digits, exponent form below 0.001, and never rounded onto 1', () => {
    expect([0.25, 0.5, 0.05, 1 / 3, 0.0042, 0.001, 0.95].map(formatProbability)).toEqual(['0.25', '0.5', '0.05', '0.333', '0.0042', '0.001', '0.95'])
    expect(formatProbability(0.00042)).toBe('4.2e-4')
    expect(formatProbability(1.171e-13)).toBe('1.2e-13')
    expect(formatProbability(0.99951)).toBe('> 0.999')
    expect(formatProbability(0.9994)).toBe('0.999')
    expect([0, 1, -0].map(formatProbability)).toEqual(['0', '1', '0'])
    expect([null, undefined, Number.NaN].map(formatProbability)).toEqual(['—', '—', '—'])
  })

  it('known by a logarithm below 1e-300, read as a power of ten', () => {
    expect(formatProbabilityFromLog(0, -1664 * Math.LN10)).toBe('≈ 10^-1664')
    expect(formatProbabilityFromLog(0.034, Math.log(0.034))).toBe('0.034')
  })

  it('as percentages in prose: whole per cent, one decimal near 0 and 100, never a false 0 or 100', () => {
    expect([0.31, 0.5, 0.004, 0.996, 0.0004, 0.9996, 0, 1, 0.01, 0.99].map(formatPercent)).toEqual(['31 %', '50 %', '0.4 %', '99.6 %', '< 0.1 %', '> 99.9 %', '0 %', '100 %', '1 %', '99 %'])
  })
})

describe('other numbers', () => {
  it('a tiny difference, a signed change, a file size and a count', () => {
    expect([3.2e-15, 0, 1e-7].map(formatTiny)).toEqual(['3e-15', '0', '1e-7'])
    expect([0.123, -0.094, 0.001, -0.001, -0].map(formatSigned)).toEqual(['+0.12', '-0.09', '0.00', '0.00', '0.00'])
    expect([812, 14540, 3250585].map(formatBytes)).toEqual(['812 B', '14.2 kB', '3.1 MB'])
    expect([countNoun(0, 'quantity', 'quantities'), countNoun(1, 'member'), countNoun(1200, 'row')]).toEqual(['no quantities', '1 member', '1,200 rows'])
    expect([0.1, 2, -0, 1234567.891, Infinity, -Infinity].map(formatExact)).toEqual(['0.1', '2', '0', '1234567.891', '∞', '-∞'])
    expect([20, 12.5, 0.25, -10, 33.333333, -0.004].map(formatPercentPoints)).toEqual(['20 %', '12.5 %', '0.25 %', '-10 %', '33.3 %', '0 %'])
    expect([0, 999, 100001, 1234567].map(formatCount)).toEqual(['0', '999', '100,001', '1,234,567'])
  })
})

describe('dates and times', () => {
  const winter = '2026-12-24T17:00:00Z'
  const summer = '2026-07-01T12:00:05Z'

  it('a moment on screens: weekday, day, short month, year, 24-hour time, in the zone given', () => {
    expect(formatDateTime(winter, { timeZone: 'UTC' })).toBe('Thu 24 Dec 2026, 17:00')
    expect(formatDateTime(winter, { timeZone: 'Pacific/Auckland' })).toBe('Fri 25 Dec 2026, 06:00')
    expect(formatDateTime(new Date('2026-03-02T00:05:00Z'), { timeZone: 'UTC' })).toBe('Mon 2 Mar 2026, 00:05')
    expect(formatDateTime(summer, { timeZone: 'America/New_York', seconds: true })).toBe('Wed 1 Jul 2026, 08:00:05')
  })

  it('without a zone, the reader’s own clock', () => {
    const own = new Intl.DateTimeFormat().resolvedOptions().timeZone
    expect(formatDateTime(winter)).toBe(formatDateTime(winter, { timeZone: own }))
  })

  it('in documents and e-mail: words in full, the zone named with its offset from UTC on that date', () => {
    expect(formatDateTime(summer, { timeZone: 'Europe/Oslo', words: 'long', zone: true })).toBe('Wednesday 1 July 2026, 14:00 (Europe/Oslo, UTC+2)')
    expect(formatDateTime(winter, { timeZone: 'Europe/Oslo', words: 'long', zone: true })).toBe('Thursday 24 December 2026, 18:00 (Europe/Oslo, UTC+1)')
    expect(formatDateTime(winter, { timeZone: 'Asia/Kolkata', words: 'long', zone: true })).toBe('Thursday 24 December 2026, 22:30 (Asia/Kolkata, UTC+5:30)')
    expect(formatDateTime(winter, { timeZone: 'America/New_York', words: 'long', zone: true })).toBe('Thursday 24 December 2026, 12:00 (America/New_York, UTC-5)')
    expect(formatDateTime(winter, { timeZone: 'Europe/London', words: 'long', zone: true })).toBe('Thursday 24 December 2026, 17:00 (Europe/London, UTC+0)')
    expect(formatDateTime(winter, { timeZone: 'UTC', words: 'long', zone: true, seconds: true })).toBe('Thursday 24 December 2026, 17:00:00 (UTC)')
    expect(formatDateTime(summer, { timeZone: 'America/New_York', words: 'long', zone: true, seconds: true })).toBe('Wednesday 1 July 2026, 08:00:05 (America/New_York, UTC-4)')
    // Past midnight in the zone: the date moves too.
    expect(formatDateTime('2026-12-24T23:30:00Z', { timeZone: 'Pacific/Auckland', words: 'long', zone: true })).toBe('Friday 25 December 2026, 12:30 (Pacific/Auckland, UTC+13)')
  })

  it('short forms: day and time without the year, a day, a time of day', () => {
    expect(formatShortDateTime(winter, { timeZone: 'UTC' })).toBe('24 Dec, 17:00')
    expect(formatDate(winter, { timeZone: 'Pacific/Auckland' })).toBe('25 Dec 2026')
    expect(formatClockTime(winter, { timeZone: 'Europe/Oslo' })).toBe('18:00')
    expect(formatClockTime('2026-12-24T00:00:00Z', { timeZone: 'UTC' })).toBe('00:00')
  })

  it('no moment reads —; a text that is not a date is shown as it came', () => {
    for (const f of [formatDateTime, formatShortDateTime, formatDate, formatClockTime]) {
      expect([f(null), f(undefined), f('')]).toEqual(['—', '—', '—'])
      expect(f('next Tuesday')).toBe('next Tuesday')
    }
  })

  it('relative to now, coarsely', () => {
    const now = new Date('2026-12-01T12:00:00Z')
    expect(['2026-12-04T12:00:00Z', '2026-12-01T17:00:00Z', '2026-12-01T12:00:20Z', '2026-11-29T12:00:00Z'].map((v) => formatRelativeTime(v, now)))
      .toEqual(['in 3 days', 'in 5 hours', 'in 1 minute', '2 days ago'])
  })
})

describe('distribution families', () => {
  it('names every family and writes a distribution with its parameters', () => {
    expect(Object.keys(FAMILY_LABELS).sort()).toEqual([...Object.keys(FAMILY_PARAMS), 'half-normal'].sort())
    expect(describeDistribution({ family: 'normal', mu: 3.2, sigma: 1.1 })).toBe('Normal(mean 3.2, sd 1.1)')
    expect(describeDistribution({ family: 'gamma', shape: 6, rate: 0.5 })).toBe('Gamma(shape 6, rate 0.5)')
    expect(describeDistribution({ family: 'scaled-beta', alpha: 2, beta: 12345.6, lower: -1, upper: 1e7 })).toBe('Beta(2, 12345.6) on [-1, 1e+7]')
    expect(describeDistribution(null)).toBe('—')
    expect(paramsText({ family: 'normal', mu: 10.2834, sigma: -0 })).toBe('μ\u00a0=\u00a010.28, σ\u00a0=\u00a00')
    expect(paramsText({ family: 'half-normal', scale: 2 })).toBe('scale\u00a0=\u00a02')
  })
})
