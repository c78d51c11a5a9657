import express, { Router } from 'express'
import { describe, expect, it } from 'vitest'
import { listRoutes } from '../../support/routes.ts'

describe('listRoutes', () => {
  it('lists routes of nested routers with their mount paths', () => {
    const app = express()
    const inner = Router()
    inner.get('/', () => {})
    inner.patch('/:id', () => {})
    inner.route('/:id/things').get(() => {}).post(() => {})
    const api = Router()
    api.use((_req, _res, next) => next())
    api.use('/items', inner)
    const bare = Router()
    bare.get('/health', () => {})
    api.use(bare)
    app.use('/api', api)
    app.get('/{*splat}', () => {})
    expect(listRoutes(app)).toEqual([
      'GET /api/items',
      'PATCH /api/items/:id',
      'GET /api/items/:id/things',
      'POST /api/items/:id/things',
      'GET /api/health',
      'GET /{*splat}',
    ])
  })
})
