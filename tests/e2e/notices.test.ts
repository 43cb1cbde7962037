import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { inject } from 'vitest'
import { sql } from 'kysely'
import { ApiClient, linkIn, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { type AppProcess, freePort, startAppProcess, stopAppProcess } from '../support/app-process'
import { tickSlots, waitFor } from '../support/cluster'
import { orgIdOf } from '../support/programme-fixtures'
import { startMailCatcher } from '../../scripts/fakes/mail-catcher.mjs'

interface Caught { subject: string; text: string; html: string; to: string[]; headers?: Record<string, string> }

let owner: ApiClient
let slug: string
let orgId: string
let instrumentId: string
let siteId: string
let assetId: string
let surveyId: string
let bandOneFindingId: string
const people: Record<string, { client: ApiClient; id: string; email: string }> = {}

const mailbox = () => inject('mailCatcherUrl')
async function mailFor(to: string): Promise<Caught[]> {
  return (await fetch(`${mailbox()}/messages?to=${encodeURIComponent(to)}`)).json()
}
/** Runs the daily jobs at `now` (the moved clock) and delivers the outbox, through the test hook. */
async function runJobs(now: string | null, deliver = true) {
  const res = await new ApiClient().post('/api/dev/notices/run', now ? { now, deliver } : { jobs: false, deliver })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as { jobs: { ran: Array<{ localDate: string; noticesAdded: number; emailsQueued: number }>; skipped: number } | null; delivered: { sent: number; retrying: number; failed: number } | null }
}
const subjects = (mails: Caught[]) => mails.map((m) => m.subject).sort()

async function join(key: string, role: string) {
  const email = `${key}@notices.test`
  people[key] = { ...await joinByInvitation(owner, slug, email, role, `Notice ${key}`, 'notice password'), email }
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Nell Owner', 'nell@notices.test', 'Notice Power'))
  people.owner = { client: owner, id: '', email: 'nell@notices.test' }
  await join('mags', 'manager')
  await join('theo', 'thermographer')
  await join('cora', 'crew')
  orgId = await orgIdOf(slug)
  // The organisation works on New Zealand time, far from UTC, so the local day of the jobs is visible.
  await testDb().updateTable('organisations').set({ time_zone: 'Pacific/Auckland' }).where('id', '=', orgId).execute()
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'NZ1', name: 'Harbour Road', kind: 'substation', latitude: -36.8, longitude: 174.7 })
  siteId = site.body.id
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId, label: 'CB4', assetClass: 'breaker' })
  assetId = asset.body.id
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'N-1', bandFromUm: 8, bandToUm: 14, calibrationDue: '2027-03-20' })
  expect(inst.status, JSON.stringify(inst.body)).toBe(201)
  instrumentId = inst.body.id
  const route = await owner.post(`/api/orgs/${slug}/routes`, { name: 'Harbour loop', baseName: 'Depot', baseLatitude: -36.9, baseLongitude: 174.8, recurrenceMonths: 12, siteIds: [siteId] })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2027-03-10', thermographerId: people.theo!.id, instrumentId, routeId: route.body.id })
  expect(survey.status, JSON.stringify(survey.body)).toBe(201)
  surveyId = survey.body.id
  // Invitations were mailed directly; from here on every e-mail counted is a notice.
  await fetch(`${mailbox()}/messages`, { method: 'DELETE' })
}, 90_000)

describe('daily notices with a moved clock', () => {
  it('waits for the organisation\'s local morning, then sends each due notice once per person', async () => {
    // 17:30 UTC on 1 March is 06:30 on 2 March in Auckland (UTC+13): before the notice hour (7), nothing runs.
    const early = await runJobs('2027-03-01T17:30:00Z')
    expect(early.jobs!.ran).toEqual([])
    expect(await mailFor(people.theo!.email)).toHaveLength(0)

    const run = await runJobs('2027-03-01T18:30:00Z')
    expect(run.jobs!.ran).toHaveLength(1)
    expect(run.jobs!.ran[0]!.localDate).toBe('2027-03-02')
    // Survey due (thermographer + owner + manager) and calibration due (owner + manager).
    expect(run.jobs!.ran[0]!.emailsQueued).toBe(5)
    expect(run.delivered!.sent).toBe(5)

    const theo = await mailFor(people.theo!.email)
    expect(theo).toHaveLength(1)
    expect(theo[0]!.subject).toBe('Coming up: the Harbour loop survey on Wed, 10 March 2027 — Notice Power')
    expect(theo[0]!.text).toContain(`/orgs/${slug}/surveys/${surveyId}`)
    expect(theo[0]!.text).toContain('in 8 days')
    expect(subjects(await mailFor(people.mags!.email))).toEqual([
      'Calibration of Halden T8 (serial N-1) is due in 18 days — Notice Power',
      'Coming up: the Harbour loop survey on Wed, 10 March 2027 — Notice Power',
    ])
    expect(await mailFor(people.owner!.email)).toHaveLength(2)
    expect(await mailFor(people.cora!.email)).toHaveLength(0)
  })

  it('sends nothing more when the same run fires again, or the next day finds the same things due', async () => {
    const again = await runJobs('2027-03-01T18:45:00Z')
    expect(again.jobs!.ran).toEqual([]) // the organisation's run for 2 March is already claimed
    const nextDay = await runJobs('2027-03-02T19:00:00Z')
    expect(nextDay.jobs!.ran).toHaveLength(1)
    expect(nextDay.jobs!.ran[0]).toMatchObject({ localDate: '2027-03-03', noticesAdded: 0, emailsQueued: 0 })
    expect(await mailFor(people.theo!.email)).toHaveLength(1)
    expect(await mailFor(people.mags!.email)).toHaveLength(2)
    const claims = await testDb().selectFrom('job_runs').select(['slot']).where('job', '=', 'notices-daily').orderBy('slot').execute()
    expect(claims.map((c) => c.slot)).toEqual([`${orgId}/2027-03-02`, `${orgId}/2027-03-03`])
  })

  it('keeps a notice in-app only for a person who turned its e-mail off', async () => {
    const off = await people.theo!.client.patch(`/api/orgs/${slug}/notices/preferences`, { preferences: [{ kind: 'survey_overdue', byEmail: false }] })
    expect(off.status, JSON.stringify(off.body)).toBe(200)
    expect(off.body.find((p: { kind: string }) => p.kind === 'survey_overdue').byEmail).toBe(false)
    // 11 March 19:00 UTC is 12 March in Auckland: the survey of 10 March is overdue.
    await runJobs('2027-03-11T19:00:00Z')
    await runJobs('2027-03-12T19:00:00Z')
    expect(await mailFor(people.theo!.email)).toHaveLength(1)
    const list = await people.theo!.client.get(`/api/orgs/${slug}/notices`)
    expect(list.body.items.map((n: { kind: string }) => n.kind)).toEqual(['survey_overdue', 'survey_due'])
    expect(list.body.items[0].title).toBe('Overdue: the Harbour loop survey was planned for Wed, 10 March 2027')
    // The manager wants it by e-mail: exactly one overdue e-mail although the job ran on two days.
    const mags = await mailFor(people.mags!.email)
    expect(mags.filter((m) => m.subject.startsWith('Overdue:'))).toHaveLength(1)
    // The calibration date (20 March) has not changed: still only the one calibration e-mail.
    expect(mags.filter((m) => m.subject.startsWith('Calibration'))).toHaveLength(1)
  })

  it('marks notices read, one or all, and counts what is unread', async () => {
    const before = await people.theo!.client.get(`/api/orgs/${slug}/notices?show=unread`)
    expect(before.body.unread).toBe(2)
    const one = await people.theo!.client.post(`/api/orgs/${slug}/notices/read`, { ids: [before.body.items[0].id] })
    expect(one.body).toEqual({ marked: 1, unread: 1 })
    // Someone else's notice id changes nothing.
    const other = await people.mags!.client.post(`/api/orgs/${slug}/notices/read`, { ids: [before.body.items[1].id] })
    expect(other.body.marked).toBe(0)
    const all = await people.theo!.client.post(`/api/orgs/${slug}/notices/read`, { all: true })
    expect(all.body).toEqual({ marked: 1, unread: 0 })
    const empty = await people.theo!.client.post(`/api/orgs/${slug}/notices/read`, {})
    expect(empty.status).toBe(400)
    expect(empty.body.data.fieldErrors.ids).toBeDefined()
  })
})

describe('one-click e-mail choices', () => {
  it('carries RFC 8058 headers whose link turns the kind off without signing in', async () => {
    const [mail] = await mailFor(people.theo!.email)
    expect(mail!.headers!['list-unsubscribe-post']).toBe('List-Unsubscribe=One-Click')
    const url = /^<(.+)>$/.exec(mail!.headers!['list-unsubscribe']!)![1]!
    expect(url).toContain('/api/notices/unsubscribe?token=')
    // What a mail client sends: a form POST with no cookies.
    const res = await fetch(url, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'List-Unsubscribe=One-Click' })
    expect(res.status).toBe(200)
    expect(await res.json()).toMatchObject({ kind: 'survey_due', byEmail: false, organisationName: 'Notice Power' })
    const prefs = await people.theo!.client.get(`/api/orgs/${slug}/notices/preferences`)
    expect(prefs.body.find((p: { kind: string }) => p.kind === 'survey_due').byEmail).toBe(false)
  })

  it('links to a page, open without signing in, that can turn the e-mails back on', async () => {
    const [mail] = await mailFor(people.theo!.email)
    const page = linkIn(mail!.text, '/notices/unsubscribe')
    const html = await fetch(page).then((r) => r.text())
    expect(html).toContain('E-mail choices')
    expect(html).toContain('Surveys due within 14 days')
    const token = new URL(page).searchParams.get('token')!
    const anonymous = new ApiClient()
    // Opening the page (GET) changes nothing: only the browser's POST does.
    expect((await anonymous.get(`/api/notices/unsubscribe?token=${encodeURIComponent(token)}`)).body.byEmail).toBe(false)
    const on = await anonymous.post(`/api/notices/unsubscribe?token=${encodeURIComponent(token)}`, { byEmail: true })
    expect(on.body.byEmail).toBe(true)
    const prefs = await people.theo!.client.get(`/api/orgs/${slug}/notices/preferences`)
    expect(prefs.body.find((p: { kind: string }) => p.kind === 'survey_due').byEmail).toBe(true)
  })

  it('refuses a token that was altered or made up', async () => {
    const [mail] = await mailFor(people.theo!.email)
    const token = new URL(linkIn(mail!.text, '/notices/unsubscribe')).searchParams.get('token')!
    const [payload, mac] = token.split('.')
    // Same signature, another person: the payload names the manager instead.
    const forged = Buffer.from(JSON.stringify([orgId, people.mags!.id, 'survey_due'])).toString('base64url')
    for (const bad of [`${forged}.${mac}`, `${payload}.${mac!.slice(0, -2)}xx`, 'not-a-token-at-all']) {
      const res = await new ApiClient().post(`/api/notices/unsubscribe?token=${encodeURIComponent(bad)}`, {})
      expect(res.status, bad).toBe(404)
    }
    const missing = await new ApiClient().post('/api/notices/unsubscribe', {})
    expect(missing.status).toBe(400)
  })
})

describe('band 1 findings', () => {
  it('tells the managers the moment a band 1 finding is saved, once', async () => {
    const before = (await owner.get(`/api/orgs/${slug}/notices`)).body.total
    const plan = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: people.theo!.id, instrumentId, siteIds: [siteId] })
    await people.theo!.client.post(`/api/orgs/${slug}/surveys/${plan.body.id}/start`, { version: plan.body.version })
    // 30 K over a similar component: band 1 under ANSI/NETA Table 100.18 (over 15 °C between similar components).
    const f = await people.theo!.client.post(`/api/orgs/${slug}/surveys/${plan.body.id}/findings`, {
      assetId, component: 'Load-side lug', apparentC: 60, referenceC: 30, ambientC: 20, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'loose_connection',
    })
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    expect(f.body.band).toBe(1)
    bandOneFindingId = f.body.id
    // In-app at once, without any job running.
    const list = (await owner.get(`/api/orgs/${slug}/notices`)).body
    expect(list.total).toBe(before + 1)
    expect(list.items[0]).toMatchObject({ kind: 'finding_band1', title: 'Band 1 finding on CB4 at Harbour Road', link: `/orgs/${slug}/surveys/${plan.body.id}` })
    expect(list.items[0].body).toContain('not an instruction to approach')
    // The e-mail is already in the outbox; the worker sends it.
    const queued = await testDb().selectFrom('outbox').select(['to_address']).where('kind', '=', 'finding_band1').where('state', '=', 'waiting').execute()
    expect(queued.map((q) => q.to_address).sort()).toEqual(['mags@notices.test', 'nell@notices.test'])
    await runJobs(null)
    await runJobs(null)
    const mags = (await mailFor(people.mags!.email)).filter((m) => m.subject.startsWith('Band 1'))
    expect(mags).toHaveLength(1)
    expect(mags[0]!.text).toContain('Notice theo has just recorded a band 1 finding')
    expect((await mailFor(people.theo!.email)).filter((m) => m.subject.startsWith('Band 1'))).toHaveLength(0)
    // Out of the way of the later runs (it would be overdue on their dates).
    await testDb().updateTable('surveys').set({ archived_at: new Date() }).where('id', '=', plan.body.id).execute()
  })
})

describe('the outbox for managers', () => {
  it('lists messages by state, paginated on the server', async () => {
    const all = await people.mags!.client.get(`/api/orgs/${slug}/outbox?pageSize=2`)
    expect(all.status).toBe(200)
    expect(all.body.items).toHaveLength(2)
    expect(all.body.total).toBe(all.body.counts.sent + all.body.counts.waiting + all.body.counts.sending + all.body.counts.failed)
    expect(all.body.counts.sent).toBeGreaterThanOrEqual(8)
    const sent = await people.mags!.client.get(`/api/orgs/${slug}/outbox?state=sent&pageSize=100`)
    expect(sent.body.items.every((m: { state: string; sentAt: string | null }) => m.state === 'sent' && m.sentAt)).toBe(true)
    expect((await people.mags!.client.get(`/api/orgs/${slug}/outbox?state=failed`)).body.items).toEqual([])
    expect((await people.mags!.client.get(`/api/orgs/${slug}/outbox?state=lost`)).status).toBe(400)
    expect((await people.theo!.client.get(`/api/orgs/${slug}/outbox`)).status).toBe(403)
  })
})

// ---- Reliability: separate app processes of the built server against the same database ----

const apps: AppProcess[] = []

/** A process of the built server with its own notice settings (the shared one keeps clock-driven jobs off). */
async function startApp(extra: Record<string, string>): Promise<AppProcess> {
  const app = await startAppProcess({ NUXT_TEST_HOOKS: '0', ...extra })
  apps.push(app)
  return app
}
const stopApp = stopAppProcess

afterAll(async () => {
  for (const a of apps) await stopApp(a)
})

describe('when the mail server is down', () => {
  it('keeps the message waiting, retries with back-off, and delivers it once when SMTP is back', async () => {
    const smtpPort = await freePort() // nothing listens here yet: SMTP is "stopped"
    const app = await startApp({
      NUXT_SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, NUXT_SCHEDULER: 'off', NUXT_OUTBOX_WORKER: 'on',
      NUXT_OUTBOX_POLL_MS: '200', NUXT_OUTBOX_RETRY_UNIT_MS: '300',
    })
    // A fresh due notice: the survey moves to 20 March, so 12 March (Auckland) finds it due within 14 days.
    await testDb().updateTable('surveys').set({ planned_for: '2027-03-20' }).where('id', '=', surveyId).execute()
    const run = await runJobs('2027-03-13T19:00:00Z', false)
    expect(run.jobs!.ran[0]!.emailsQueued).toBe(3)
    const row = () => testDb().selectFrom('outbox').selectAll().where('to_address', '=', people.theo!.email).where('dedupe_key', '=', `survey_due:${surveyId}:2027-03-20`).executeTakeFirstOrThrow()
    const waiting = await waitFor('two failed attempts', async () => { const r = await row(); return r.attempts >= 2 && r.state === 'waiting' ? r : null })
    expect(waiting.last_error).toMatch(/ECONNREFUSED|connect/i)
    expect(waiting.sent_at).toBeNull()

    const catcher = await startMailCatcher({ smtpPort }) // SMTP is back on the same port
    try {
      const sent = await waitFor('delivery after the restart', async () => { const r = await row(); return r.state === 'sent' ? r : null })
      expect(sent.attempts).toBeGreaterThanOrEqual(3)
      // Give the worker a few more passes: still exactly one message.
      await new Promise((r) => setTimeout(r, 1500))
      const got = catcher.messages().filter((m: Caught) => m.to.includes(people.theo!.email))
      expect(got).toHaveLength(1)
      expect(got[0]!.subject).toBe('Coming up: the Harbour loop survey on Sat, 20 March 2027 — Notice Power')
      expect(catcher.messages()).toHaveLength(3)
      const states = await testDb().selectFrom('outbox').select(['state']).where('dedupe_key', '=', `survey_due:${surveyId}:2027-03-20`).execute()
      expect(states.map((s) => s.state)).toEqual(['sent', 'sent', 'sent'])
    } finally {
      await stopApp(app)
      await catcher.close()
    }
  }, 150_000)

  it('gives a message up as failed after the last attempt, with the reason', async () => {
    const smtpPort = await freePort()
    const app = await startApp({
      NUXT_SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, NUXT_SCHEDULER: 'off', NUXT_OUTBOX_WORKER: 'on',
      NUXT_OUTBOX_POLL_MS: '200', NUXT_OUTBOX_RETRY_UNIT_MS: '200', NUXT_OUTBOX_MAX_ATTEMPTS: '2',
    })
    try {
      await testDb().updateTable('instruments').set({ calibration_due: '2027-03-25' }).where('id', '=', instrumentId).execute()
      await runJobs('2027-03-14T19:00:00Z', false)
      const failed = await waitFor('the message to fail', async () => {
        const r = await testDb().selectFrom('outbox').selectAll().where('to_address', '=', people.mags!.email)
          .where('dedupe_key', '=', `calibration_due:${instrumentId}:2027-03-25`).executeTakeFirst()
        return r?.state === 'failed' ? r : null
      })
      expect(failed.attempts).toBe(2)
      expect(failed.last_error).toMatch(/ECONNREFUSED|connect/i)
      const page = await people.mags!.client.get(`/api/orgs/${slug}/outbox?state=failed`)
      expect(page.body.items.map((m: { lastError: string }) => m.lastError)).toHaveLength(2)
      expect(page.body.items[0].lastError).toMatch(/ECONNREFUSED|connect/i)
    } finally {
      await stopApp(app)
    }
  }, 150_000)
})

describe('two app instances against one database', () => {
  it('fires each scheduled run once, and sends each notice once', async () => {
    // A survey due within 14 days of the real clock, for the scheduler that runs on it.
    const today = new Intl.DateTimeFormat('en-CA', { timeZone: 'Pacific/Auckland' }).format(new Date())
    const soon = new Date(`${today}T00:00:00Z`)
    soon.setUTCDate(soon.getUTCDate() + 5)
    const plannedFor = soon.toISOString().slice(0, 10)
    const plan = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor, thermographerId: people.theo!.id, instrumentId, siteIds: [siteId] })
    expect(plan.status, JSON.stringify(plan.body)).toBe(201)
    await fetch(`${mailbox()}/messages`, { method: 'DELETE' })
    await sql`delete from job_runs where job = 'notices-tick'`.execute(testDb())

    const both = { NUXT_SCHEDULER: 'on', NUXT_SCHEDULER_CRON: '*/2 * * * * *', NUXT_NOTICES_HOUR: '0', NUXT_OUTBOX_WORKER: 'on', NUXT_OUTBOX_POLL_MS: '300' }
    const [a, b] = await Promise.all([startApp(both), startApp(both)])
    try {
      // Let both instances see several ticks together.
      await waitFor('four ticks seen by both instances', async () => {
        const seen = (app: AppProcess) => { const t = tickSlots(app.log); return new Set([...t.claimed, ...t.skipped]) }
        const sa = seen(a!)
        return [...seen(b!)].filter((s) => sa.has(s)).length >= 4
      }, 45_000).catch((e) => { throw new Error(`${(e as Error).message}\nA:\n${a!.log.join('\n')}\nB:\n${b!.log.join('\n')}`) })
    } finally {
      await Promise.all([stopApp(a!), stopApp(b!)])
    }
    const { claimed: claimedA, skipped: skippedA } = tickSlots(a!.log)
    const { claimed: claimedB, skipped: skippedB } = tickSlots(b!.log)
    // Every tick both instances saw was run by exactly one of them.
    const seenByBoth = [...new Set([...claimedA, ...skippedA])].filter((s) => claimedB.includes(s) || skippedB.includes(s))
    expect(seenByBoth.length).toBeGreaterThanOrEqual(4)
    for (const slot of seenByBoth) expect([claimedA.includes(slot), claimedB.includes(slot)].filter(Boolean), slot).toHaveLength(1)
    expect(claimedA.filter((s) => claimedB.includes(s))).toEqual([])
    const rows = await testDb().selectFrom('job_runs').select(['slot', 'claimed_by', 'finished_at']).where('job', '=', 'notices-tick').execute()
    expect(rows.map((r) => r.slot).sort()).toEqual([...claimedA, ...claimedB].sort())
    // The organisation's daily run for today happened once, and the thermographer got one e-mail for the survey.
    const daily = await testDb().selectFrom('job_runs').selectAll().where('job', '=', 'notices-daily').where('slot', '=', `${orgId}/${today}`).execute()
    expect(daily).toHaveLength(1)
    const theo = (await mailFor(people.theo!.email)).filter((m) => m.text.includes(plan.body.id))
    expect(theo).toHaveLength(1)
  }, 240_000)
})

describe('work orders and verifications', () => {
  it('tells assignees and managers of work orders coming due or overdue, and the thermographer of a waiting verification', async () => {
    // Rows written straight into the tables (the work-order screens are tested on their own).
    const wo = async (number: number, title: string, dueOn: string) => {
      const r = await sql<{ id: string }>`insert into work_orders (organisation_id, site_id, number, title, state, due_on)
        values (${orgId}, ${siteId}, ${number}, ${title}, 'open', ${dueOn}) returning id`.execute(testDb())
      await sql`insert into work_order_assignees (organisation_id, work_order_id, user_id) values (${orgId}, ${r.rows[0]!.id}, ${people.cora!.id})`.execute(testDb())
      return r.rows[0]!.id
    }
    const soon = await wo(71, 'Retighten the load-side lug', '2027-04-04')
    const late = await wo(72, 'Replace the cable lug', '2027-03-30')
    const far = await wo(73, 'Clean the bushing', '2027-04-20')
    // WO-73 was repaired and waits for its re-scan.
    await sql`update work_orders set state = 'awaiting_verification' where id = ${far}`.execute(testDb())
    await sql`insert into verifications (organisation_id, work_order_id, finding_id, site_id, thermographer_id, state)
      values (${orgId}, ${far}, ${bandOneFindingId}, ${siteId}, ${people.theo!.id}, 'waiting')`.execute(testDb())
    for (const p of Object.values(people)) await fetch(`${mailbox()}/messages?to=${encodeURIComponent(p.email)}`, { method: 'DELETE' })

    // 1 April 19:00 UTC is 2 April in Auckland: WO-71 is due in 2 days, WO-72 is 3 days late, WO-73 is weeks away.
    await runJobs('2027-04-01T19:00:00Z')
    await runJobs('2027-04-02T19:00:00Z')
    expect(subjects(await mailFor(people.cora!.email))).toEqual([
      'WO-71 at Harbour Road is due in 2 days — Notice Power',
      'WO-72 at Harbour Road is past its due date — Notice Power',
    ])
    const mags = subjects(await mailFor(people.mags!.email))
    expect(mags.filter((m) => m.startsWith('WO-'))).toEqual([
      'WO-71 at Harbour Road is due in 2 days — Notice Power',
      'WO-72 at Harbour Road is past its due date — Notice Power',
    ])
    expect(subjects(await mailFor(people.theo!.email))).toEqual(['A repair at Harbour Road is waiting for its verification scan — Notice Power'])
    const cora = await people.cora!.client.get(`/api/orgs/${slug}/notices`)
    expect(cora.body.items.find((n: { kind: string }) => n.kind === 'work_order_due').link).toBe(`/orgs/${slug}/work-orders/${soon}`)
  })
})
