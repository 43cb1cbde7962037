import type { NoticeKind } from '../notices'

export interface NoticeItem {
  id: string
  kind: NoticeKind
  title: string
  body: string
  link: string
  readAt: string | null
  createdAt: string
}

export interface NoticePage {
  items: NoticeItem[]
  total: number
  page: number
  pageSize: number
  /** Unread notices of this person in this organisation (for the header count). */
  unread: number
}

export interface NoticePreference { kind: NoticeKind; label: string; byEmail: boolean }

export type OutboxStateName = 'waiting' | 'sending' | 'sent' | 'failed'

export interface OutboxItem {
  id: string
  kind: string
  toAddress: string
  subject: string
  state: OutboxStateName
  attempts: number
  nextAttemptAt: string | null
  lastError: string | null
  sentAt: string | null
  createdAt: string
}

export interface OutboxPage {
  items: OutboxItem[]
  total: number
  page: number
  pageSize: number
  /** Rows per state across the whole outbox of the organisation. */
  counts: Record<OutboxStateName, number>
}

/** What the one-click page shows about the preference a link names. */
export interface NoticeTokenInfo { organisationName: string; kind: NoticeKind; label: string; byEmail: boolean }
