import { existsSync } from 'node:fs'
import path from 'node:path'
import { describe, expect, it } from 'vitest'
import { openApiDocument } from '../../../shared/openapi'
import { findingListQuerySchema } from '../../../shared/schemas/survey'

const doc = openApiDocument('http://127.0.0.1:3000') as { openapi: string; paths: Record<string, Record<string, { parameters?: Array<{ name: string; in: string }>; requestBody?: unknown }>> }

describe('OpenAPI document', () => {
  it('is OpenAPI 3.1 and every path and method it describes is a route file of the app', () => {
    expect(doc.openapi).toBe('3.1.0')
    for (const [p, ops] of Object.entries(doc.paths)) {
      for (const method of Object.keys(ops)) {
        const base = p.replace(/^\/api\//, '').replace('{org}', '[org]').replace('{id}', '[id]')
        const candidates = [`${base}.${method}.ts`, `${base}/index.${method}.ts`].map((f) => path.join(process.cwd(), 'server/api', f))
        expect(candidates.some((f) => existsSync(f)), `${method.toUpperCase()} ${p}`).toBe(true)
      }
    }
  })

  it('takes the list parameters from the zod schema the route validates with', () => {
    const names = doc.paths['/api/orgs/{org}/findings']!.get!.parameters!.filter((x) => x.in === 'query').map((x) => x.name)
    expect(names.sort()).toEqual(Object.keys(findingListQuerySchema.shape).sort())
    expect(doc.paths['/api/orgs/{org}/work-orders/{id}/move']!.post!.requestBody).toBeTruthy()
  })
})
