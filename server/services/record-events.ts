// The timeline: an append-only record of who did what to a finding, work order or verification, when and why.
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { RecordSubjectKind } from '~~/db/tables/record-events'
import type { TimelineEntry } from '#shared/types/work-order'

type Db = Kysely<Database> | Transaction<Database>

export interface RecordEventInput {
  organisationId: string
  subjectKind: RecordSubjectKind
  subjectId: string
  workOrderId?: string | null
  actorId: string | null
  action: string
  reason?: string
  details?: Record<string, unknown>
}

/** Appends one entry to the timeline; call it inside the transaction that makes the change. */
export async function recordEvent(db: Db, e: RecordEventInput): Promise<void> {
  await db.insertInto('record_events').values({
    organisation_id: e.organisationId,
    subject_kind: e.subjectKind,
    subject_id: e.subjectId,
    work_order_id: e.workOrderId ?? null,
    actor_id: e.actorId,
    action: e.action,
    reason: e.reason ?? '',
    details: JSON.stringify(e.details ?? {}),
    // clock_timestamp(), not now(): several entries written in one transaction keep their order.
    created_at: sql<Date>`clock_timestamp()`,
  }).execute()
}

const STATE_WORDS: Record<string, string> = {
  open: 'open', planned: 'planned', in_repair: 'in repair', awaiting_verification: 'awaiting verification',
  closed: 'closed', deferred: 'deferred', cancelled: 'cancelled',
}

/** One sentence per entry, in our own words, for the timeline. */
export function summariseEvent(action: string, d: Record<string, unknown>): string {
  const s = (k: string) => String(d[k] ?? '')
  switch (action) {
    case 'raised': return `Raised ${s('reference')} from ${s('findingCount')} finding(s); due ${d.dueOn ? s('dueOn') : 'date: none (record and trend)'}.`
    case 'assigned': return (d.names as string[] | undefined)?.length ? `Assigned to ${(d.names as string[]).join(', ')}.` : 'Nobody assigned.'
    case 'edited': return `Changed ${((d.fields as string[] | undefined) ?? []).join(', ') || 'details'}.`
    case 'state_changed': return `Moved from ${STATE_WORDS[s('from')] ?? s('from')} to ${STATE_WORDS[s('to')] ?? s('to')}.`
    case 'work_recorded': return 'Recorded the repair work (cause found, parts, time).'
    case 'deferred': return `Deferred until ${s('until')}.`
    case 'cancelled': return 'Cancelled.'
    case 'reopened': return `Reopened: the re-scan still ranks band ${s('band')}.`
    case 'closed': return 'Closed: every finding verified repaired.'
    case 'verification_requested': return `Verification requested for ${s('component')}${d.thermographer ? ` from ${s('thermographer')}` : ' (whoever next surveys the site)'}.`
    case 'verification_assigned': return d.thermographer ? `Verification assigned to ${s('thermographer')}.` : 'Verification left for whoever next surveys the site.'
    case 'verification_passed': return `Re-scan of ${s('component')} is below the lowest band (${s('objectC')} °C).`
    case 'verification_failed': return `Re-scan of ${s('component')} still ranks band ${s('band')} (${s('objectC')} °C).`
    case 'verification_withdrawn': return `Verification of ${s('component')} withdrawn.`
    case 'closed_verified': return 'Finding closed: verified repaired.'
    case 'photo_added': return `Added a photo${d.fileName ? ` (${s('fileName')})` : ''}.`
    default: return action.replace(/_/g, ' ')
  }
}

/** Timeline entries, oldest first: those of a work order (and of its findings), or those of one subject. */
export async function timeline(
  db: Db,
  orgId: string,
  of: { workOrderId: string; findingIds: string[] } | { subjectKind: RecordSubjectKind; subjectId: string },
): Promise<TimelineEntry[]> {
  let q = db.selectFrom('record_events as e')
    .leftJoin('users as u', 'u.id', 'e.actor_id')
    .select(['e.id', 'e.created_at', 'e.actor_id', 'u.name as actor_name', 'e.subject_kind', 'e.subject_id', 'e.action', 'e.reason', 'e.details'])
    .where('e.organisation_id', '=', orgId)
  if ('workOrderId' in of) {
    const { workOrderId, findingIds } = of
    q = q.where((eb) => eb.or([
      eb('e.work_order_id', '=', workOrderId),
      ...(findingIds.length ? [eb.and([eb('e.subject_kind', '=', 'finding'), eb('e.subject_id', 'in', findingIds), eb('e.work_order_id', 'is', null)])] : []),
    ]))
  } else if (of.subjectKind === 'finding') {
    // A finding's history includes the re-scans of it.
    const findingId = of.subjectId
    q = q.where((eb) => eb.or([
      eb.and([eb('e.subject_kind', '=', 'finding'), eb('e.subject_id', '=', findingId)]),
      eb.and([eb('e.subject_kind', '=', 'verification'), eb('e.subject_id', 'in', eb.selectFrom('verifications as v').select('v.id')
        .where('v.organisation_id', '=', orgId).where('v.finding_id', '=', findingId))]),
    ]))
  } else {
    q = q.where('e.subject_kind', '=', of.subjectKind).where('e.subject_id', '=', of.subjectId)
  }
  const rows = await q.orderBy('e.created_at').orderBy(sql`e.id`).execute()
  return rows.map((r) => ({
    id: r.id,
    at: r.created_at.toISOString(),
    actor: r.actor_id ? { id: r.actor_id, name: r.actor_name ?? '—' } : null,
    subjectKind: r.subject_kind,
    subjectId: r.subject_id,
    action: r.action,
    summary: summariseEvent(r.action, r.details ?? {}),
    reason: r.reason,
    details: r.details ?? {},
  }))
}
