import { expect } from 'vitest'
import { splitCsv } from '../../shared/csv'
import type { ApiClient, ApiResponse } from './api'

/** A valid site body with overrides. */
export function siteBody(overrides: Record<string, unknown> = {}) {
  return { code: 'LMV-01', name: 'Lowmoor Grid', kind: 'substation', latitude: 54.3712, longitude: -2.9081, voltageKv: 132, ...overrides }
}

/** Creates a site through the API and returns it. */
export async function createSite(client: ApiClient, slug: string, overrides: Record<string, unknown> = {}) {
  const res = await client.post(`/api/orgs/${slug}/sites`, siteBody(overrides))
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string; code: string; version: number; [k: string]: unknown }
}

/** Creates an asset through the API and returns it. */
export async function createAsset(client: ApiClient, slug: string, siteId: string, overrides: Record<string, unknown> = {}) {
  const res = await client.post(`/api/orgs/${slug}/assets`, { siteId, label: 'T1', assetClass: 'transformer', ...overrides })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string; label: string; version: number; [k: string]: unknown }
}

/**
 * Sends a CSV text the way the import page does: opens a session, uploads it in pieces cut at record
 * boundaries, and asks for the check. Returns the check's answer (the preview).
 */
export async function uploadCsv(client: ApiClient, slug: string, kind: 'sites' | 'assets', text: string, pieceChars = 64 * 1024): Promise<ApiResponse> {
  const created = await client.post(`/api/orgs/${slug}/register-imports`, { kind, fileName: `${kind}.csv`, totalChars: text.length })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  const id = created.body.id as string
  const pieces = splitCsv(text, pieceChars)
  for (const [seq, piece] of pieces.entries()) {
    const res = await client.post(`/api/orgs/${slug}/register-imports/${id}/chunks`, { seq, text: piece })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
  }
  return client.post(`/api/orgs/${slug}/register-imports/${id}/check`)
}

/** Every problem of an import, all pages. */
export async function allProblems(client: ApiClient, slug: string, id: string) {
  const out: Array<{ row: number; field: string; message: string }> = []
  for (let page = 1; ; page++) {
    const res = await client.get(`/api/orgs/${slug}/register-imports/${id}/problems?page=${page}&pageSize=100`)
    expect(res.status).toBe(200)
    out.push(...res.body.items)
    if (out.length >= res.body.total || !res.body.items.length) return out
  }
}
