import bcrypt from 'bcryptjs'
import type { Kysely } from 'kysely'
import type { Database } from '../database'
import { seedDemoProgramme } from './programme'
import { seedDemoWorkOrders } from './work-orders'
import { seedDemoTrends } from './trends'
import { seedDemoFieldwork } from './fieldwork'
import { seedDemoQualifications } from './reports'
import { seedDemoNotices } from './notices'
import { TRIAL_DAYS, TRIAL_SEATS } from '../../shared/billing/plans'

// The demo scenario is invented: Lowmoor Valley Power is a fictional utility, its sites and people are made up.
export const DEMO_PASSWORD = 'greybody-demo-2026'
export const DEMO_ORG = { slug: 'lowmoor-valley-power', name: 'Lowmoor Valley Power' }
export const DEMO_CONTRACTOR = { slug: 'kestrel-survey-services', name: 'Kestrel Survey Services' }
export const DEMO_USERS = [
  { email: 'owner@lowmoor.example', name: 'Maren Ostrander', role: 'owner' },
  { email: 'manager@lowmoor.example', name: 'Tobias Reyle', role: 'manager' },
  { email: 'thermographer@lowmoor.example', name: 'Ines Karvonen', role: 'thermographer' },
  { email: 'crew@lowmoor.example', name: 'Dario Pell', role: 'crew' },
  { email: 'viewer@lowmoor.example', name: 'Hanne Solberg', role: 'viewer' },
] as const

const SITES = [
  { code: 'HXS', name: 'Harrow Cross', kind: 'substation', kv: 132, lat: 52.418, lon: -1.912 },
  { code: 'MBY', name: 'Millbrook Yard', kind: 'switchyard', kv: 275, lat: 52.503, lon: -1.774 },
  { code: 'FEN', name: 'Fenwick Lane', kind: 'substation', kv: 33, lat: 52.361, lon: -1.703 },
  { code: 'OAK', name: 'Oakhurst Primary', kind: 'substation', kv: 66, lat: 52.287, lon: -1.851 },
  { code: 'STW', name: 'Stowe Water Pumping', kind: 'plant_room', kv: 11, lat: 52.332, lon: -2.046 },
  { code: 'BRK', name: 'Brackley Down', kind: 'substation', kv: 132, lat: 52.552, lon: -2.018 },
  { code: 'LMR', name: 'Lowmoor Grid', kind: 'switchyard', kv: 400, lat: 52.446, lon: -2.133 },
  { code: 'TAN', name: 'Tanner Street', kind: 'substation', kv: 11, lat: 52.401, lon: -1.829 },
  { code: 'WLD', name: 'Wildmere Feeder 4', kind: 'line_section', kv: 33, lat: 52.236, lon: -1.962 },
  { code: 'CRN', name: 'Cranleigh Works', kind: 'plant_room', kv: 11, lat: 52.478, lon: -1.651 },
  { code: 'ASH', name: 'Ashby Ridge', kind: 'substation', kv: 66, lat: 52.598, lon: -1.879 },
  { code: 'PEL', name: 'Pelham Crossing Feeder 2', kind: 'line_section', kv: 11, lat: 52.312, lon: -1.598 },
] as const

const CLASS_BY_KIND: Record<string, string[]> = {
  substation: ['transformer', 'breaker', 'disconnect', 'bus', 'cable_termination', 'instrument_transformer', 'surge_arrester', 'capacitor_bank'],
  switchyard: ['breaker', 'disconnect', 'bus', 'instrument_transformer', 'surge_arrester', 'insulator'],
  plant_room: ['switchgear', 'mcc', 'panelboard', 'cable_termination', 'transformer'],
  line_section: ['line_connector', 'recloser', 'insulator', 'disconnect', 'surge_arrester'],
}

const LABEL_PREFIX: Record<string, string> = {
  transformer: 'TX', breaker: 'CB', disconnect: 'DS', bus: 'BUS', cable_termination: 'CT', instrument_transformer: 'IT',
  surge_arrester: 'SA', recloser: 'RC', capacitor_bank: 'CAP', switchgear: 'SWG', mcc: 'MCC', panelboard: 'PB',
  line_connector: 'LC', insulator: 'INS',
}

// A small deterministic generator so every demo database is the same.
function rng(seed: number) {
  let s = seed >>> 0
  return () => ((s = (s * 1664525 + 1013904223) >>> 0) / 2 ** 32)
}

/** Loads the demo scenario unless it is already there. Returns false when it was present. */
export async function seedDemo(db: Kysely<Database>): Promise<boolean> {
  const present = await db.selectFrom('organisations').select('id').where('slug', '=', DEMO_ORG.slug).executeTakeFirst()
  if (present) return false
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10)
  await db.transaction().execute(async (trx) => {
    const org = await trx.insertInto('organisations').values({ slug: DEMO_ORG.slug, name: DEMO_ORG.name, time_zone: 'Europe/London', load_exponent: 1.8 })
      .returning('id').executeTakeFirstOrThrow()
    const contractor = await trx.insertInto('organisations').values({ slug: DEMO_CONTRACTOR.slug, name: DEMO_CONTRACTOR.name, time_zone: 'Europe/London' })
      .returning('id').executeTakeFirstOrThrow()
    // Both demo organisations are on the trial, as every new organisation is.
    for (const id of [org.id, contractor.id]) {
      await trx.insertInto('organisation_billing').values({
        organisation_id: id, plan: 'trial', status: 'trialing', seats_paid: TRIAL_SEATS, trial_ends_at: new Date(Date.now() + TRIAL_DAYS * 86_400_000),
      }).execute()
    }
    for (const u of DEMO_USERS) {
      const user = await trx.insertInto('users')
        .values({ email: u.email, name: u.name, password_hash: hash, time_zone: 'Europe/London' })
        .returning('id').executeTakeFirstOrThrow()
      await trx.insertInto('memberships').values({ organisation_id: org.id, user_id: user.id, role: u.role, removed_at: null }).execute()
      // The thermographer also works for a contractor: two organisations to switch between.
      if (u.role === 'thermographer') {
        await trx.insertInto('memberships').values({ organisation_id: contractor.id, user_id: user.id, role: 'owner', removed_at: null }).execute()
      }
    }
    const rand = rng(20261202)
    for (const s of SITES) {
      const site = await trx.insertInto('sites').values({
        organisation_id: org.id, code: s.code, name: s.name, kind: s.kind, latitude: s.lat, longitude: s.lon, voltage_kv: s.kv,
        access_notes: s.kind === 'line_section' ? 'Pole-mounted; view from the road verge.' : 'Key safe at the main gate; call control before entry.',
        safety_notes: s.kv >= 132 ? 'Switching permit required. Work in pairs.' : s.kind === 'plant_room' ? 'IR windows fitted on the main switchboard.' : '',
      }).returning('id').executeTakeFirstOrThrow()
      const classes = CLASS_BY_KIND[s.kind]!
      const count = 10 + Math.floor(rand() * 6)
      const used = new Map<string, number>()
      for (let i = 0; i < count; i++) {
        const cls = classes[Math.floor(rand() * classes.length)]!
        const n = (used.get(cls) ?? 0) + 1
        used.set(cls, n)
        const rated = cls === 'transformer' ? 800 + Math.round(rand() * 12) * 100 : 200 + Math.round(rand() * 20) * 50
        await trx.insertInto('assets').values({
          organisation_id: org.id, site_id: site.id, label: `${s.code}-${LABEL_PREFIX[cls]}-${String(n).padStart(2, '0')}`,
          asset_class: cls, voltage_kv: s.kv, rated_current_a: rated,
          criticality: 1 + Math.floor(rand() * 5), condition: rand() < 0.15 ? 3 : rand() < 0.4 ? 2 : 1,
          components: cls === 'bus' || cls === 'line_connector' ? ['A', 'B', 'C'] : cls === 'panelboard' ? ['A', 'B', 'C', 'N'] : ['A', 'B', 'C'],
          manufacturer: '', model: '', interval_months: null, archived_at: null,
        }).execute()
      }
    }
    // Surface libraries, instruments and a route (db/seeds/programme.ts).
    await seedDemoProgramme(trx, { orgId: org.id, contractorId: contractor.id })
    // A reviewed survey with findings and work orders in every state (db/seeds/work-orders.ts).
    await seedDemoWorkOrders(trx, { orgId: org.id })
    // Earlier readings of one component, so its trend shows on the asset page (db/seeds/trends.ts).
    await seedDemoTrends(trx, { orgId: org.id })
    // A band corrected on review, with its reason (db/seeds/fieldwork.ts).
    await seedDemoFieldwork(trx, { orgId: org.id })
    // Thermography qualifications printed on survey reports (db/seeds/reports.ts).
    await seedDemoQualifications(trx, { orgId: org.id })
    // A few in-app notices so the bell shows something at once (db/seeds/notices.ts).
    await seedDemoNotices(trx, { orgId: org.id })
  })
  return true
}
