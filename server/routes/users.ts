import { Router } from 'express'
import { userCreateSchema, userUpdateSchema } from '../../shared/schemas/users'
import type { DirectoryUser } from '../../shared/api/users'
import type { Role } from '../../shared/types/index'
import { currentUser, requireRole } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { idParam } from '../http/id-param'
import { validateBody } from '../http/validate-body'
import { recordAudit } from '../services/audit'
import { createUser, listUsers, updateUser } from '../services/users'

export function usersRouter(db: Db): Router {
  const r = Router()

  // Analysts pick study members and panel experts from this list: no more than a name, e-mail and role.
  r.get('/directory', requireRole('admin', 'analyst'), async (_req, res) => {
    const users = await listUsers(db)
    res.json(users.filter((u) => !u.disabled).map((u): DirectoryUser => ({ id: u.id, displayName: u.displayName, email: u.email, role: u.role })))
  })

  r.use(requireRole('admin'))

  r.get('/', async (_req, res) => {
    res.json(await listUsers(db))
  })

  r.post('/', async (req, res) => {
    const body = await validateBody(userCreateSchema, req.body)
    const user = await db.transaction(async (trx) => {
      const created = await createUser(trx, { ...body, role: body.role as Role })
      await recordAudit(trx, { actorId: currentUser(req).id, action: 'user.create', subject: `user:${created.id}`, details: { email: created.email, role: created.role } })
      return created
    })
    res.status(201).json(user)
  })

  r.patch('/:id', async (req, res) => {
    const id = idParam(req.params.id, 'User')
    const body = await validateBody(userUpdateSchema, req.body)
    const me = currentUser(req)
    if (id === me.id && (body.disabled === true || (body.role && body.role !== 'admin'))) {
      throw new HttpError(400, 'You cannot disable your own account or remove your own admin role', body.disabled ? { disabled: 'Not for your own account' } : { role: 'Not for your own account' })
    }
    const user = await db.transaction(async (trx) => {
      const updated = await updateUser(trx, id, { displayName: body.displayName, role: body.role as Role | undefined, disabled: body.disabled })
      if (body.disabled === true) {
        // Signing a disabled user out everywhere: drop their stored sessions.
        await trx('session').whereRaw(`(sess->'passport'->>'user')::int = ?`, [id]).delete()
      }
      await recordAudit(trx, { actorId: me.id, action: 'user.update', subject: `user:${id}`, details: body })
      return updated
    })
    res.json(user)
  })

  return r
}
