// Routes of a small reference resource that every signed-in role reads and admins manage
// (service levels, work types, machines): list, get, create, update, remove.
import { Router } from 'express'
import type { z } from 'zod'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'

/** What such a resource's service offers the routes. */
export interface AdminManagedService<Input, Patch> {
  list(): Promise<unknown>
  get(id: number): Promise<unknown>
  /** `actor` is the signed-in admin (for the audit log of resources that keep one). */
  create(input: Input, actor: SessionUser): Promise<unknown>
  update(id: number, patch: Patch, actor: SessionUser): Promise<unknown>
  remove(id: number, actor: SessionUser): Promise<void>
}

export function adminManagedRoutes<InS extends z.ZodType, PatchS extends z.ZodType>(
  items: AdminManagedService<z.infer<InS>, z.infer<PatchS>>,
  inputSchema: InS,
  patchSchema: PatchS,
): Router {
  const router = Router()

  router.get('/', requireAuth, async (_req, res) => {
    res.json(await items.list())
  })

  router.get('/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await items.get(id))
  })

  router.post('/', requireRole('admin'), async (req, res) => {
    res.status(201).json(await items.create(parse(inputSchema, req.body), currentAuth(req).user))
  })

  router.patch('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await items.update(id, parse(patchSchema, req.body), currentAuth(req).user))
  })

  router.delete('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await items.remove(id, currentAuth(req).user)
    res.status(204).end()
  })

  return router
}
