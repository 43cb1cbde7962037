import { z } from 'zod'
import { NOTICE_KINDS } from '../notices'
import { pageSchema, pageSizeSchema } from './common'

/** The person's own notices: all, or only the unread ones. */
export const noticeListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  show: z.enum(['all', 'unread']).default('all'),
})

/** Mark notices as read: some by id, or all of them. */
export const noticeReadSchema = z.object({
  ids: z.array(z.uuid({ error: 'Not a notice.' })).max(200).optional(),
  all: z.boolean().optional(),
}).refine((v) => v.all === true || (v.ids?.length ?? 0) > 0, { message: 'Name the notices to mark, or choose all.', path: ['ids'] })

export const noticeKindSchema = z.enum(NOTICE_KINDS, { error: 'Not a kind of notice.' })

/** E-mail choices for some kinds (kinds left out stay as they are). */
export const noticePreferencesSchema = z.object({
  preferences: z.array(z.object({ kind: noticeKindSchema, byEmail: z.boolean({ error: 'Choose yes or no.' }) })).min(1).max(NOTICE_KINDS.length),
})

export const OUTBOX_STATES = ['waiting', 'sending', 'sent', 'failed'] as const

/** The outbox list for managers: filter by state, newest first, paginated. */
export const outboxListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  state: z.enum([...OUTBOX_STATES, 'all'], { error: 'Not an outbox state.' }).default('all'),
})

/** The one-click change from an e-mail; the token in the query string names the person, organisation and kind. */
export const noticeTokenQuerySchema = z.object({ token: z.string().min(10).max(600) })
