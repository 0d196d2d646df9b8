import type { StudySummary, User } from '../../shared/types/index'
import type { Db } from '../db/knex'

/** Studies the user belongs to (admins see every study), with the user's role in each. */
export async function listStudiesFor(db: Db, user: User): Promise<StudySummary[]> {
  const q = db('studies as s')
    .join('users as o', 'o.id', 's.owner_id')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', '=', 's.id').andOn('m.user_id', '=', db.raw('?', [user.id]))
    })
    .select(
      's.*',
      'o.display_name as owner_name',
      'm.study_role as my_role',
      db.raw('(SELECT count(*)::int FROM study_members sm WHERE sm.study_id = s.id) as member_count'),
    )
    .orderBy('s.updated_at', 'desc')
  if (user.role !== 'admin') q.whereNotNull('m.user_id')
  const rows = await q
  const counts = await quantityCounts(db, rows.map((r) => r.id))
  return rows.map((r) => ({
    id: r.id,
    title: r.title,
    context: r.context,
    status: r.status,
    ownerId: r.owner_id,
    ownerName: r.owner_name,
    myRole: r.my_role ?? 'admin',
    quantityCount: counts.get(r.id) ?? 0,
    memberCount: r.member_count,
    version: r.version,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }))
}

async function quantityCounts(db: Db, studyIds: number[]): Promise<Map<number, number>> {
  const hasTable = await db.schema.hasTable('quantities')
  if (!hasTable || studyIds.length === 0) return new Map()
  const rows = await db('quantities').whereIn('study_id', studyIds).groupBy('study_id').select('study_id', db.raw('count(*)::int as n'))
  return new Map(rows.map((r: { study_id: number; n: number }) => [r.study_id, r.n]))
}
