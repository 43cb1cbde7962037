import { describe, expect, it } from 'vitest'
import { TOKEN_NEVER, TOKEN_PATTERN, tokenCan, tokenPermissions } from '../../../shared/api-tokens'
import { PERMISSIONS, can, type Permission } from '../../../shared/permissions'

describe('API token scopes', () => {
  it('read holds exactly the viewer permissions, minus people, billing, settings and tokens', () => {
    const viewer = (Object.keys(PERMISSIONS) as Permission[]).filter((p) => can('viewer', p) && !TOKEN_NEVER.includes(p))
    expect(tokenPermissions('read').sort()).toEqual(viewer.sort())
    expect(tokenPermissions('read')).toContain('surveys.view')
  })
  it('never manages members, billing, the organisation or tokens, in any scope or method', () => {
    for (const scope of ['read', 'read_write'] as const) {
      for (const p of ['members.view', 'members.manage', 'billing.manage', 'organisation.manage', 'tokens.manage'] as const) {
        for (const method of ['GET', 'POST', 'PATCH', 'DELETE']) expect(tokenCan(scope, p, method)).toBe(false)
      }
    }
  })
  it('lets a read token make no change, and a read-write token only move work orders', () => {
    expect(tokenCan('read', 'surveys.view', 'GET')).toBe(true)
    expect(tokenCan('read', 'surveys.view', 'POST')).toBe(false)
    expect(tokenCan('read', 'workorders.work', 'POST')).toBe(false)
    expect(tokenCan('read_write', 'workorders.work', 'POST', '/api/orgs/lvp/work-orders/0b9c/move')).toBe(true)
    expect(tokenCan('read', 'workorders.work', 'POST', '/api/orgs/lvp/work-orders/0b9c/move')).toBe(false)
    // Recording repair details shares the permission but is not a state change: people only.
    expect(tokenCan('read_write', 'workorders.work', 'POST', '/api/orgs/lvp/work-orders/0b9c/work')).toBe(false)
    expect(tokenCan('read_write', 'surveys.run', 'POST')).toBe(false)
    expect(tokenCan('read_write', 'register.edit', 'PATCH')).toBe(false)
  })
  it('recognises the secret format (prefix + 43 base64url characters)', () => {
    expect(TOKEN_PATTERN.test(`gbt_${'A'.repeat(43)}`)).toBe(true)
    expect(TOKEN_PATTERN.test(`gbt_${'A'.repeat(42)}`)).toBe(false)
    expect(TOKEN_PATTERN.test(`xyz_${'A'.repeat(43)}`)).toBe(false)
  })
})
