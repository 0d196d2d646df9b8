import { ValidationError, type AnyObjectSchema, type InferType } from 'yup'
import { HttpError } from './http-error'

interface Description {
  type: string
  fields?: Record<string, Description>
  innerType?: Description
}

const SHAPE_MESSAGES: Record<string, string> = { string: 'Must be text', object: 'Must be an object', array: 'Must be a list', number: 'Must be a number', boolean: 'Must be true or false' }

/**
 * Finds values whose JSON shape cannot be what the schema expects (an array where text belongs, an object where a
 * number belongs…) before yup sees them: yup's transforms assume the right shape and would throw instead of reporting.
 */
function shapeErrors(d: Description, value: unknown, path: string, out: Record<string, string>): void {
  if (value === undefined || value === null) return
  const isObject = typeof value === 'object' && !Array.isArray(value)
  const ok = d.type === 'string' ? typeof value !== 'object' : d.type === 'number' || d.type === 'boolean' || d.type === 'date' ? typeof value !== 'object'
    : d.type === 'object' ? isObject : d.type === 'array' ? Array.isArray(value) : true
  if (!ok) {
    out[path || '_'] ??= SHAPE_MESSAGES[d.type] ?? 'Has the wrong type'
    return
  }
  if (d.type === 'object' && d.fields) {
    for (const [k, child] of Object.entries(d.fields)) shapeErrors(child, (value as Record<string, unknown>)[k], path ? `${path}.${k}` : k, out)
  } else if (d.type === 'array' && d.innerType) {
    ;(value as unknown[]).forEach((v, i) => shapeErrors(d.innerType!, v, `${path}[${i}]`, out))
  }
}

const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype'])

/** Keys that could reach an object's prototype are refused wherever they appear (prototype pollution). */
function forbiddenKeys(value: unknown, path: string, out: Record<string, string>, depth = 0): void {
  if (depth > 20 || value === null || typeof value !== 'object') return
  for (const key of Object.keys(value)) {
    const where = Array.isArray(value) ? `${path}[${key}]` : path ? `${path}.${key}` : key
    if (FORBIDDEN_KEYS.has(key)) out[where] = 'This field name is not accepted'
    else forbiddenKeys((value as Record<string, unknown>)[key], where, out, depth + 1)
  }
}

/**
 * A NUL, or half of a UTF-16 surrogate pair: PostgreSQL cannot store the first, and JSON/UTF-8 cannot carry the second.
 * Other control characters are accepted: U+000B and the like arrive invisibly in text pasted from Word, and refusing
 * them would block a person for a character they cannot see; the .docx export cleans them (`docxText`).
 */
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/
export const UNSTORABLE_MESSAGE = 'Contains a character that cannot be stored (a NUL or a broken Unicode character); remove it and try again'

/** Finds text, in values and in key names, that the database would refuse: refused here, before anything is written. */
function unstorableText(value: unknown, path: string, out: Record<string, string>, depth = 0): void {
  if (typeof value === 'string') {
    if (UNSTORABLE.test(value)) out[path || '_'] = UNSTORABLE_MESSAGE
    return
  }
  if (depth > 20 || value === null || typeof value !== 'object') return
  for (const [key, child] of Object.entries(value)) {
    const where = Array.isArray(value) ? `${path}[${key}]` : path ? `${path}.${key}` : key
    if (UNSTORABLE.test(key)) out[where] = UNSTORABLE_MESSAGE
    else unstorableText(child, where, out, depth + 1)
  }
}

const descriptions = new WeakMap<AnyObjectSchema, Description>()

/**
 * A schema's description, built once: yup's describe() walks and clones the whole schema (about 0.2 ms for a
 * judgement, more than validating one), and a yup schema never changes once built.
 */
function describeOnce(schema: AnyObjectSchema): Description {
  let d = descriptions.get(schema)
  if (!d) {
    d = schema.describe() as unknown as Description
    descriptions.set(schema, d)
  }
  return d
}

/** Validates a body with a shared yup schema; throws 400 with one message per field. */
export async function validateBody<S extends AnyObjectSchema>(schema: S, body: unknown): Promise<InferType<S>> {
  if (body === null || typeof body !== 'object' || Array.isArray(body)) {
    throw new HttpError(400, 'The request body must be a JSON object')
  }
  // No prototype: a top-level "__proto__" key must become a field of the report, not its prototype.
  const shape: Record<string, string> = Object.create(null)
  forbiddenKeys(body, '', shape)
  unstorableText(body, '', shape)
  if (Object.keys(shape).length) throw new HttpError(400, 'Some fields need attention', shape)
  shapeErrors(describeOnce(schema), body, '', shape)
  if (Object.keys(shape).length) throw new HttpError(400, 'Some fields need attention', shape)
  try {
    return await schema.validate(body, { abortEarly: false, stripUnknown: false })
  } catch (err) {
    if (err instanceof ValidationError) {
      const fields: Record<string, string> = {}
      for (const e of err.inner.length ? err.inner : [err]) {
        const key = e.path || (e.type === 'noUnknown' ? String(e.params?.unknown ?? '_') : '_')
        fields[key] ??= e.message
      }
      throw new HttpError(400, 'Some fields need attention', fields)
    }
    throw err
  }
}
