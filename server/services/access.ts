import type { StudyRole, User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/errors'

export type StudyAccessRole = StudyRole | 'admin'

export interface StudyAccess {
  studyId: number
  role: StudyAccessRole
  user: User
}

/** 404 when the study does not exist, 403 when the user is not a member (admins are members of every study). */
export async function studyAccess(db: Db, user: User, studyId: number): Promise<StudyAccess> {
  const study = await db('studies').where({ id: studyId }).first('id')
  if (!study) throw new HttpError(404, 'Study not found')
  if (user.role === 'admin') return { studyId, role: 'admin', user }
  const member = await db('study_members').where({ study_id: studyId, user_id: user.id }).first('study_role')
  if (!member) throw new HttpError(403, 'You are not a member of this study')
  return { studyId, role: member.study_role, user }
}

/** Throws 403 unless the member's study role is one of `roles`; admins pass every check. */
export function allow(access: StudyAccess, ...roles: StudyRole[]): void {
  if (access.role === 'admin') return
  if (!roles.includes(access.role)) throw new HttpError(403, 'Your role in this study does not allow this')
}

export const canAnalyse = (access: StudyAccess) => access.role === 'admin' || access.role === 'analyst'

/** The study a row belongs to, or 404. */
export async function studyIdOf(db: Db, table: 'quantities' | 'rounds' | 'calibration_questions', id: number, what: string): Promise<number> {
  const row = await db(table).where({ id }).first('study_id')
  if (!row) throw new HttpError(404, `${what} not found`)
  return row.study_id
}
