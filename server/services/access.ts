import type { StudyRole, User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'

export type StudyAccessRole = StudyRole | 'admin'

export interface StudyAccess {
  studyId: number
  role: StudyAccessRole
  user: User
}

type StudyOwned = 'studies' | 'quantities' | 'rounds' | 'calibration_questions' | 'compositions'

/**
 * The reader's access to the study that owns row `id` of `table`, in one query (this runs on every autosave):
 * 404 when the row does not exist, 403 when the user is not a member (admins are members of every study).
 */
export async function accessVia(db: Db, user: User, table: StudyOwned, id: number, what: string): Promise<StudyAccess> {
  const studyColumn = table === 'studies' ? 't.id' : 't.study_id'
  const row: { study_id: number; study_role: StudyRole | null } | undefined = await db(`${table} as t`)
    .leftJoin('study_members as m', (j) => j.on('m.study_id', '=', studyColumn).andOn('m.user_id', '=', db.raw('?', [user.id])))
    .where('t.id', id)
    .first(`${studyColumn} as study_id`, 'm.study_role')
  return accessFromRow(row, user, what)
}

/**
 * The access a row of an object's study and the caller's membership gives (a query that reads more, such as the
 * autosave's, selects `study_id` and `study_role` the way accessVia does): 404 without the row, 403 for a non-member.
 */
export function accessFromRow(row: { study_id: number; study_role: StudyRole | null } | undefined, user: User, what: string): StudyAccess {
  if (!row) throw new HttpError(404, `${what} not found`)
  if (user.role === 'admin') return { studyId: row.study_id, role: 'admin', user }
  if (!row.study_role) throw new HttpError(403, 'You are not a member of this study')
  return { studyId: row.study_id, role: row.study_role, user }
}

/** 404 when the study does not exist, 403 when the user is not a member (admins are members of every study). */
export function studyAccess(db: Db, user: User, studyId: number): Promise<StudyAccess> {
  return accessVia(db, user, 'studies', studyId, 'Study')
}

/** Throws 403 unless the member's study role is one of `roles`; admins pass every check. */
export function allow(access: StudyAccess, ...roles: StudyRole[]): void {
  if (access.role === 'admin') return
  if (!roles.includes(access.role)) throw new HttpError(403, 'Your role in this study does not allow this')
}

export const canAnalyse = (access: StudyAccess) => access.role === 'admin' || access.role === 'analyst'
