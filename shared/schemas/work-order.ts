import { z } from 'zod'
import { isoDateSchema, notesSchema, pageSchema, pageSizeSchema, searchSchema, versionSchema } from './common'
import { findingSchema, MAX_LOAD_MULTIPLE } from './survey'

// Work orders and verifications: one set of rules for the server and the forms.

export const WORK_ORDER_STATES = ['open', 'planned', 'in_repair', 'awaiting_verification', 'closed', 'deferred', 'cancelled'] as const
export type WorkOrderStateName = (typeof WORK_ORDER_STATES)[number]

/** Plain labels for work order states (our own words). */
export const WORK_ORDER_STATE_LABELS: Record<WorkOrderStateName, string> = {
  open: 'Open',
  planned: 'Planned',
  in_repair: 'In repair',
  awaiting_verification: 'Awaiting verification',
  closed: 'Closed, verified',
  deferred: 'Deferred',
  cancelled: 'Cancelled',
}

/** States in which a work order still needs someone's action. */
export const ACTIVE_WORK_ORDER_STATES = ['open', 'planned', 'in_repair', 'awaiting_verification', 'deferred'] as const satisfies readonly WorkOrderStateName[]
/** States the crew moves a work order to with the "move" action (defer and cancel carry a reason and have their own actions). */
export const MOVE_TARGETS = ['open', 'planned', 'in_repair', 'awaiting_verification'] as const

/**
 * Which moves are allowed from each state. Closing only happens through a passed verification; a failed one reopens.
 * Kept as data so the pages offer exactly the moves the server accepts.
 */
export const WORK_ORDER_MOVES: Record<WorkOrderStateName, readonly (typeof MOVE_TARGETS)[number][]> = {
  open: ['planned', 'in_repair'],
  planned: ['open', 'in_repair'],
  in_repair: ['planned', 'awaiting_verification'],
  deferred: ['open', 'planned', 'in_repair'],
  awaiting_verification: [],
  closed: [],
  cancelled: [],
}
/** States from which a work order can be deferred or cancelled. */
export const DEFERRABLE_STATES: readonly WorkOrderStateName[] = ['open', 'planned', 'in_repair', 'deferred']
export const CANCELLABLE_STATES: readonly WorkOrderStateName[] = ['open', 'planned', 'in_repair', 'deferred', 'awaiting_verification']

export const VERIFICATION_STATES = ['waiting', 'passed', 'failed', 'withdrawn'] as const
export type VerificationStateName = (typeof VERIFICATION_STATES)[number]
export const VERIFICATION_STATE_LABELS: Record<VerificationStateName, string> = {
  waiting: 'Waiting for a re-scan',
  passed: 'Passed',
  failed: 'Still hot',
  withdrawn: 'Withdrawn',
}

const reason = (what: string) => z.string({ error: `Say ${what}.` }).trim().min(3, `Say ${what} (at least 3 characters).`).max(2000, 'Use at most 2000 characters.')
const uuidList = (what: string, max: number) =>
  z.array(z.uuid(`Not ${what}.`)).max(max, `Choose at most ${max}.`).refine((ids) => new Set(ids).size === ids.length, 'Each one only once.')
const titleSchema = z.string().trim().min(3, 'Give the work order a title of at least 3 characters.').max(160, 'Use at most 160 characters.')

/** Raising a work order from open findings of one site. */
export const workOrderRaiseSchema = z.object({
  findingIds: uuidList('a finding', 50).refine((ids) => ids.length > 0, 'Choose at least one finding.'),
  title: titleSchema.optional(),
  instructions: notesSchema.optional(),
  assigneeIds: uuidList('a person', 20).optional(),
  /** Overrides the due date the band's repair deadline gives. */
  dueOn: isoDateSchema.nullable().optional(),
})
export type WorkOrderRaiseInput = z.input<typeof workOrderRaiseSchema>

/** A manager's edit of title, instructions, due date and crew. */
export const workOrderUpdateSchema = z.object({
  title: titleSchema.optional(),
  instructions: notesSchema.optional(),
  assigneeIds: uuidList('a person', 20).optional(),
  dueOn: isoDateSchema.nullable().optional(),
  version: versionSchema,
})

/** Moving a work order along: open ⇄ planned → in repair → awaiting verification. */
export const workOrderMoveSchema = z.object({
  to: z.enum(MOVE_TARGETS, { error: 'Choose the next state.' }),
  /** For awaiting verification: who re-scans; none = whoever next surveys the site. */
  thermographerId: z.uuid('Choose a thermographer.').nullable().optional(),
  note: z.string().trim().max(2000, 'Use at most 2000 characters.').optional(),
  version: versionSchema,
})

function toInt(v: unknown): unknown {
  if (typeof v !== 'string') return v === null ? undefined : v
  const t = v.trim()
  return t === '' ? undefined : Number(t)
}

/** What the crew did: cause found, parts, work done, time spent. */
export const workOrderWorkSchema = z.object({
  causeFound: z.string().trim().max(2000, 'Use at most 2000 characters.').optional(),
  parts: z.string().trim().max(2000, 'Use at most 2000 characters.').optional(),
  workDone: z.string().trim().max(4000, 'Use at most 4000 characters.').optional(),
  timeSpentMinutes: z.preprocess(toInt, z.number({ error: 'Enter the time in whole minutes.' }).int('Enter whole minutes.')
    .min(0, 'Use 0 to 100000 minutes.').max(100_000, 'Use 0 to 100000 minutes.').optional()),
  version: versionSchema,
})

export const workOrderDeferSchema = z.object({
  reason: reason('why the repair waits'),
  until: isoDateSchema,
  version: versionSchema,
})

export const workOrderCancelSchema = z.object({
  reason: reason('why the work order is cancelled'),
  version: versionSchema,
})

const flag = z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1').optional()

/** Filters of the work order list (also used by the CSV export and the dashboard). */
export const workOrderListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  /** One state, or 'active' for everything not closed or cancelled. */
  state: z.enum([...WORK_ORDER_STATES, 'active'], { error: 'Not a state.' }).optional(),
  band: z.coerce.number().int().min(1, 'Bands are 1 to 4.').max(4, 'Bands are 1 to 4.').optional(),
  siteId: z.uuid('Not a site.').optional(),
  assigneeId: z.uuid('Not a person.').optional(),
  /** Only those assigned to the signed-in person. */
  mine: flag,
  /** Only those past their due date and not finished. */
  overdue: flag,
  q: searchSchema,
  sort: z.enum(['due', 'band', 'newest', 'updated']).default('due'),
})
export type WorkOrderListQuery = z.output<typeof workOrderListQuerySchema>

export const workOrderCandidatesQuerySchema = z.object({ siteId: z.uuid('Not a site.').optional() })

export const verificationListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  state: z.enum(VERIFICATION_STATES, { error: 'Not a state.' }).optional(),
  /** Only those assigned to me or to nobody (what I can pick up). */
  mine: flag,
  siteId: z.uuid('Not a site.').optional(),
})

// The reading fields of a finding, without what names the component (the verification is of the same one).
const { assetId: _a, component: _c, phase: _p, probableCause: _pc, causeNotes: _cn, ...readingShape } = findingSchema.shape

/** A verification reading: the finding form's reading fields, the imager used, and optionally the survey it was taken on. */
export const verificationReadingSchema = z
  .object({
    ...readingShape,
    instrumentId: z.uuid('Choose the imager you used.'),
    surveyId: z.uuid('Not a survey.').nullable().optional(),
    version: versionSchema,
  })
  .superRefine((v, ctx) => {
    if (v.apparentC !== undefined && v.referenceC !== undefined && v.referenceC > v.apparentC) {
      ctx.addIssue({ code: 'custom', path: ['referenceC'], message: 'The reference reads hotter than the hot spot: check the two readings.' })
    }
    if ((v.loadA === undefined) !== (v.ratedA === undefined)) {
      ctx.addIssue({ code: 'custom', path: [v.loadA === undefined ? 'loadA' : 'ratedA'], message: 'Enter both the load and the rated current, or neither.' })
    }
    if (v.loadA !== undefined && v.ratedA !== undefined && v.loadA > MAX_LOAD_MULTIPLE * v.ratedA) {
      ctx.addIssue({ code: 'custom', path: ['loadA'], message: `The load is over ${MAX_LOAD_MULTIPLE} × the rated current: check both figures.` })
    }
    if ((v.windowTransmittance === undefined) !== (v.windowC === undefined)) {
      const path = v.windowTransmittance === undefined ? 'windowTransmittance' : 'windowC'
      ctx.addIssue({ code: 'custom', path: [path], message: 'An IR window needs both its transmittance and its temperature.' })
    }
  })
export type VerificationReadingInput = z.input<typeof verificationReadingSchema>
export type VerificationReadingValues = z.output<typeof verificationReadingSchema>

/** Assigning (or un-assigning) the thermographer of a waiting verification. */
export const verificationAssignSchema = z.object({
  thermographerId: z.uuid('Choose a thermographer.').nullable(),
  version: versionSchema,
})

/** Repair deadlines per band (days; null = record and trend, no due date), as the settings form sends them. */
const repairDays = z.number({ error: 'Enter a number of days.' }).int('Use whole days.').min(0, 'Use 0 to 3650 days.').max(3650, 'Use 0 to 3650 days.').nullable().optional()
export const repairDeadlinesSchema = z.object({
  repairDaysBand1: repairDays,
  repairDaysBand2: repairDays,
  repairDaysBand3: repairDays,
  repairDaysBand4: repairDays,
})
export const repairDeadlinesUpdateSchema = repairDeadlinesSchema.extend({ version: versionSchema })
