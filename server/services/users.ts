import bcrypt from 'bcryptjs'
import type { SessionData } from 'express-session'
import type pg from 'pg'
import { normaliseEmail } from '../../shared/schemas/auth'
import type { Role, StudyRole, User } from '../../shared/types/index'
import { checkPassword } from '../auth/passwords'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { ACCOUNT_ROLES_FOR } from './studies'

interface UserRow {
  id: number
  email: string
  display_name: string
  role: Role
  password_hash: string
  disabled: boolean
  created_at: Date
  updated_at: Date
}

const BCRYPT_COST = 10
/** A hash of no one's password at the same cost: unknown and disabled accounts take as long to refuse as a wrong password. */
const DUMMY_HASH = '$2b$10$fZqvjp3eClntf3TNw635fOllKOXt.O74VD.t8cr9iwIzsupSAwkwe'

export function toUser(r: Omit<UserRow, 'password_hash'>): User {
  return {
    id: r.id,
    email: r.email,
    displayName: r.display_name,
    role: r.role,
    disabled: r.disabled,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }
}

export async function findUserById(db: Db, id: number): Promise<User | null> {
  const row = await db<UserRow>('users').where({ id }).first()
  return row ? toUser(row) : null
}

/**
 * A stored session with the account it is signed in to, in one query (this runs on every request, autosaves
 * included): the session's data when it exists and has not expired (connect-pg-simple's own condition, `now` in
 * seconds), and its account (null when the session is not signed in or the account is gone). Reads the session
 * store's table through the store's own pool.
 */
export async function sessionWithAccount(pool: pg.Pool, sid: string, now: number): Promise<{ sess: SessionData; account: User | null } | undefined> {
  const { rows } = await pool.query<{ sess: SessionData } & Partial<Omit<UserRow, 'password_hash'>>>(
    `SELECT s.sess, u.id, u.email, u.display_name, u.role, u.disabled, u.created_at, u.updated_at
       FROM "session" s
       LEFT JOIN users u ON u.id = CASE WHEN s.sess #>> '{passport,user}' ~ '^[0-9]{1,9}$' THEN (s.sess #>> '{passport,user}')::int END
      WHERE s.sid = $1 AND s.expire >= to_timestamp($2)`,
    [sid, now],
  )
  const row = rows[0]
  if (!row) return undefined
  const { sess, ...account } = row
  return { sess, account: account.id === null || account.id === undefined ? null : toUser(account as Omit<UserRow, 'password_hash'>) }
}

/** Returns the user when the password matches an enabled account, else null (no hint which part failed). */
export async function verifyCredentials(db: Db, email: string, password: string): Promise<User | null> {
  const row = await db<UserRow>('users').whereRaw('lower(email) = lower(?)', [normaliseEmail(email)]).first()
  const ok = await checkPassword(password, row && !row.disabled ? row.password_hash : DUMMY_HASH)
  return ok && row && !row.disabled ? toUser(row) : null
}

export async function listUsers(db: Db): Promise<User[]> {
  const rows = await db<UserRow>('users').select('*').orderBy('id')
  return rows.map(toUser)
}

export async function createUser(db: Db, input: { email: string; displayName: string; role: Role; password: string }): Promise<User> {
  const existing = await db('users').whereRaw('lower(email) = lower(?)', [input.email]).first()
  if (existing) throw new HttpError(400, 'This e-mail address is already registered', { email: 'This e-mail address is already registered' })
  const [row] = await db<UserRow>('users')
    .insert({
      email: input.email.toLowerCase(),
      display_name: input.displayName,
      role: input.role,
      password_hash: await bcrypt.hash(input.password, BCRYPT_COST),
    })
    .returning('*')
  return toUser(row)
}

const article = (word: string) => (/^[aeiou]/.test(word) ? `an ${word}` : `a ${word}`)
const listed = (items: string[]) => (items.length < 2 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`)

/**
 * Study powers live in study memberships, so an account's role may change only to one that can hold every membership
 * the account has (the rule that admits members): otherwise 409 naming the studies, and nothing changes. The account's
 * row stays locked until commit, so a membership added at the same moment waits and is checked against the new role.
 */
export async function updateUser(db: Db, id: number, patch: { displayName?: string; role?: Role; disabled?: boolean }): Promise<User> {
  return db.transaction(async (trx) => {
    const current = await trx<UserRow>('users').where({ id }).forUpdate().first()
    if (!current) throw new HttpError(404, 'User not found')
    if (patch.role !== undefined && patch.role !== current.role) {
      const memberships: { title: string; study_role: StudyRole }[] = await trx('study_members as m').join('studies as s', 's.id', 'm.study_id')
        .where('m.user_id', id).orderBy('s.id').select('s.title', 'm.study_role')
      const clashes = memberships.filter((m) => !ACCOUNT_ROLES_FOR[m.study_role].includes(patch.role!))
      if (clashes.length) {
        const many = clashes.length > 1
        throw new HttpError(
          409,
          `${current.display_name} is ${listed(clashes.map((m) => `${m.study_role} of “${m.title}”`))}; ${article(patch.role)} account cannot hold ${many ? 'these study roles' : 'this study role'}. Remove them from ${many ? 'these studies' : 'this study'} first.`,
          { role: `Remove them from ${clashes.map((m) => m.title).join(', ')} first` },
        )
      }
    }
    const changes: Record<string, unknown> = { updated_at: trx.fn.now() }
    if (patch.displayName !== undefined) changes.display_name = patch.displayName
    if (patch.role !== undefined) changes.role = patch.role
    if (patch.disabled !== undefined) changes.disabled = patch.disabled
    const [row] = await trx<UserRow>('users').where({ id }).update(changes).returning('*')
    return toUser(row)
  })
}
