import { describe, expect, it } from 'vitest'
import { decimalMarkOf, readTypedNumber, typedNumberValue, understoodText } from '@shared/elicitation/typed-number'

const point = { decimal: '.' } as const
const comma = { decimal: ',' } as const

describe('readTypedNumber: numbers as people type them', () => {
  it.each([
    ['1840', 1840],
    [' 1840 ', 1840],
    ['-2.5', -2.5],
    ['\u22122.5', -2.5],
    ['+3', 3],
    ['.5', 0.5],
    ['0.5', 0.5],
    ['0,5', 0.5],
    ['1,5', 1.5],
    ['0,500', 0.5],
    ['1 250', 1250],
    ['1\u00a0250', 1250],
    ['1\u202f250', 1250],
    ['12 345 678', 12345678],
    ['1 250.75', 1250.75],
    ['1,250,000', 1250000],
    ['1,250.5', 1250.5],
    ['1.250,5', 1250.5],
    ['2e-3', 0.002],
    ['1.5E6', 1500000],
  ])('where a point is the decimal mark, "%s" reads %s', (typed, value) => {
    expect(readTypedNumber(typed, point)).toEqual({ ok: true, value })
  })

  it.each([
    ['0,5', 0.5],
    ['12,5', 12.5],
    ['1,250', 1.25],
    ['1.5', 1.5],
    ['1 250', 1250],
    ['1 250,5', 1250.5],
    ['1.250.000', 1250000],
    ['1.250,5', 1250.5],
    ['-0,25', -0.25],
  ])('where a comma is the decimal mark, "%s" reads %s', (typed, value) => {
    expect(readTypedNumber(typed, comma)).toEqual({ ok: true, value })
  })

  it('refuses what could be read two ways, saying both readings', () => {
    expect(readTypedNumber('1,250', point)).toEqual({ ok: false, empty: false, message: '“1,250” could mean 1250 or 1.250: type 1250 or 1.250' })
    expect(readTypedNumber('1.250', comma)).toEqual({ ok: false, empty: false, message: '“1.250” could mean 1250 or 1,250: type 1250 or 1,250' })
    expect(readTypedNumber('-12,500', point).ok).toBe(false)
  })

  it.each(['12a', 'abc', '1,2,3', '12 5', '1 2.5', '1..5', '1,,5', '1.', ',5', '1.2.3,4,5', '--1', '%', 'e5', '1e', '1.250,5,0'])(
    'refuses "%s" with a message',
    (typed) => {
      const read = readTypedNumber(typed, point)
      expect(read.ok).toBe(false)
      if (!read.ok) expect(read.message.length).toBeGreaterThan(5)
    },
  )

  it('tells an empty field from a wrong one', () => {
    expect(readTypedNumber('   ', point)).toEqual({ ok: false, empty: true, message: 'Enter a number' })
    expect(readTypedNumber(null, point)).toMatchObject({ ok: false, empty: true })
  })

  it('reads a trailing % by what the field asks', () => {
    expect(readTypedNumber('12.5 %', { decimal: '.', percent: 'points' })).toEqual({ ok: true, value: 12.5 })
    expect(readTypedNumber('12,5%', { decimal: ',', percent: 'points' })).toEqual({ ok: true, value: 12.5 })
    expect(readTypedNumber('25', { decimal: '.', percent: 'points' })).toEqual({ ok: true, value: 25 })
    expect(readTypedNumber('12.5 %', { decimal: '.', percent: 'share' })).toEqual({ ok: true, value: 0.125 })
    expect(readTypedNumber('0.125', { decimal: '.', percent: 'share' })).toEqual({ ok: true, value: 0.125 })
    expect(readTypedNumber('12.5 %', point)).toEqual({ ok: false, empty: false, message: 'Enter a plain number here, without %' })
  })

  it('passes finite numbers through and refuses the rest', () => {
    expect(readTypedNumber(3.5, point)).toEqual({ ok: true, value: 3.5 })
    expect(readTypedNumber(Number.NaN, point).ok).toBe(false)
    expect(typedNumberValue('1e400', point)).toBeNull()
    expect(typedNumberValue('7', point)).toBe(7)
  })

  it('finds the decimal mark of a locale', () => {
    expect(decimalMarkOf('en-GB')).toBe('.')
    expect(decimalMarkOf('en-US')).toBe('.')
    expect(decimalMarkOf('de-DE')).toBe(',')
    expect(decimalMarkOf('fr-FR')).toBe(',')
    expect(decimalMarkOf('not a locale!')).toBe('.')
  })

  it('shows back the value understood only when the text did not say it plainly', () => {
    expect(understoodText('1 250', point, 'en-GB')).toBe('1,250')
    expect(understoodText('0,5', point, 'en-GB')).toBe('0.5')
    expect(understoodText('0,5', comma, 'de-DE')).toBeNull()
    expect(understoodText('1250', point, 'en-GB')).toBeNull()
    expect(understoodText('0.5', point, 'en-GB')).toBeNull()
    expect(understoodText('12 %', { decimal: '.', percent: 'share' }, 'en-GB')).toBe('0.12')
    expect(understoodText('1,250', point, 'en-GB')).toBeNull()
  })
})
