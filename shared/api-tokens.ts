// Organisation API tokens: their scopes, what each scope may do, and the secret's shape. Pure code, for both sides.
import { z } from 'zod'
import { PERMISSIONS, can, type Permission } from './permissions'

export const TOKEN_SCOPES = ['read', 'read_write'] as const
export type TokenScope = (typeof TOKEN_SCOPES)[number]

export const TOKEN_SCOPE_LABELS: Record<TokenScope, string> = {
  read: 'Read',
  read_write: 'Read and update work-order states',
}

/** Recognisable prefix of every secret, so leaked tokens are easy to spot in logs and code scanners. */
export const TOKEN_PREFIX = 'gbt_'
/** A secret is the prefix and 43 base64url characters (32 random bytes). */
export const TOKEN_PATTERN = /^gbt_[A-Za-z0-9_-]{43}$/
/** Requests a token may make per minute before it is answered 429. */
export const TOKEN_RATE_PER_MINUTE = 120

/** What no token can ever do, whatever its scope: people, billing, organisation settings and tokens stay with people. */
export const TOKEN_NEVER: readonly Permission[] = ['organisation.manage', 'members.view', 'members.manage', 'billing.manage', 'tokens.manage']

/**
 * Writes a read-and-write token may make: moving work orders between states (workorders.work, the permission the
 * work-order routes check). Any other write is refused to every token, whatever permission the route asks for.
 */
export const TOKEN_WRITE_PERMISSIONS: readonly string[] = ['workorders.work']

/**
 * The only writes any token can make, by method and path (workorders.work also covers recording repair details,
 * which stays with people): moving a work order between states.
 */
export const TOKEN_WRITES: ReadonlyArray<{ method: string; path: RegExp; what: string }> = [
  { method: 'POST', path: /^\/api\/orgs\/[^/]+\/work-orders\/[^/]+\/move\/?$/, what: 'move a work order to another state' },
]

const isPermission = (p: string): p is Permission => p in PERMISSIONS

/** The read permissions of a viewer, less anything in TOKEN_NEVER. */
export function tokenReadPermissions(): Permission[] {
  return (Object.keys(PERMISSIONS) as Permission[]).filter((p) => can('viewer', p) && !TOKEN_NEVER.includes(p))
}

/** The fixed permission set of a scope. */
export function tokenPermissions(scope: TokenScope): Permission[] {
  const read = tokenReadPermissions()
  if (scope === 'read') return read
  return [...read, ...TOKEN_WRITE_PERMISSIONS.filter(isPermission).filter((p) => !TOKEN_NEVER.includes(p) && !read.includes(p))]
}

/**
 * Whether a token of this scope may make a request that needs `permission`. Reads (GET, HEAD) need a permission of
 * the scope's set; any other method needs a write permission, so a read token never changes anything.
 */
export function tokenCan(scope: TokenScope, permission: Permission, method = 'GET', path = ''): boolean {
  if (TOKEN_NEVER.includes(permission)) return false
  if (method === 'GET' || method === 'HEAD') return tokenPermissions(scope).includes(permission)
  const pathname = path.split('?')[0] ?? ''
  return scope === 'read_write' && TOKEN_WRITE_PERMISSIONS.includes(permission) && TOKEN_WRITES.some((w) => w.method === method && w.path.test(pathname))
}

export const apiTokenCreateSchema = z.object({
  name: z.string({ error: 'Name the token.' }).trim().min(1, 'Name the token (e.g. the system that will use it).').max(80, 'Use at most 80 characters.'),
  scope: z.enum(TOKEN_SCOPES, { error: 'Choose read, or read and update work-order states.' }),
})
export type ApiTokenCreateInput = z.input<typeof apiTokenCreateSchema>

export const apiTokenRequestsQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1, 'Use 1 to 100.').max(100, 'Use 1 to 100.').default(25),
})

/** An API token as the API shows it (never its secret, except once in the creation answer). */
export interface ApiToken {
  id: string
  name: string
  scope: TokenScope
  hint: string
  createdAt: string
  createdBy: string | null
  lastUsedAt: string | null
  revokedAt: string | null
}

export interface ApiTokenCreated { token: ApiToken; secret: string }

export interface ApiTokenRequest { id: string; method: string; path: string; status: number; at: string }
