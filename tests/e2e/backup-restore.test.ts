// Backups: scripts/backup.sh (pg_dump) and scripts/restore.sh (pg_restore into an empty database). The restored copy
// must hold every row of every table, identical, and every object key it holds must still name a stored object.
import { execFileSync, spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { sql, type Kysely } from 'kysely'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { ROOT } from '../support/env'
import { objectExists, pngBytes, uploadImage } from '../support/images'
import { connect } from '../../db/migrator'

const sourceUrl = () => inject('databaseUrl')
const restoredName = `greybody_restore_${process.pid}`
const restoredUrl = () => sourceUrl().replace(/\/[^/?]+(\?|$)/, `/${restoredName}$1`)
const work = mkdtempSync(path.join(tmpdir(), 'greybody-backup-'))
const dumpFile = path.join(work, 'greybody.dump')
let restored: Kysely<any> | undefined

async function tables(db: Kysely<any>): Promise<string[]> {
  const { rows } = await sql<{ tablename: string }>`select tablename from pg_tables where schemaname = 'public' order by tablename`.execute(db)
  return rows.map((r) => r.tablename)
}

/** Row count and a digest of every row's text, in a fixed order: equal digests mean identical contents. */
async function fingerprint(db: Kysely<any>, table: string): Promise<{ rows: number; digest: string | null }> {
  const { rows } = await sql<{ n: string; digest: string | null }>`
    select count(*) as n, md5(string_agg(t::text, '|' order by t::text)) as digest from ${sql.table(table)} t`.execute(db)
  return { rows: Number(rows[0]!.n), digest: rows[0]!.digest }
}

beforeAll(async () => {
  await resetDatabase()
  // Some of everything: an organisation, a register, a survey with a finding and a stored image.
  const { client, slug, userId } = await signUpOwner('Bea Kerr', 'bea@backup.test', 'Backup Vale Power')
  const site = await client.post(`/api/orgs/${slug}/sites`, { code: 'BK1', name: 'Backup yard', kind: 'substation', latitude: 54.2, longitude: -2.7 })
  const asset = await client.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'T1', assetClass: 'transformer' })
  const inst = await client.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'BK-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await client.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: userId, instrumentId: inst.body.id, siteIds: [site.body.id] })
  await client.post(`/api/orgs/${slug}/surveys/${survey.body.id}/start`, { version: survey.body.version })
  const finding = await client.post(`/api/orgs/${slug}/surveys/${survey.body.id}/findings`, {
    assetId: asset.body.id, component: 'Bushing clamp', phase: 'L1', apparentC: 61, referenceC: 30, ambientC: 18, emissivity: 0.9,
    reflectedC: 18, reflectedMethod: 'reflector', probableCause: 'loose_connection',
  })
  expect(finding.status, JSON.stringify(finding.body)).toBe(201)
  const image = await uploadImage(client, `/api/orgs/${slug}/findings/${finding.body.id}/attachments`, await pngBytes(), { kind: 'infrared' })
  expect(image.complete?.status, JSON.stringify(image.complete?.body)).toBe(200)
  await sql.raw(`drop database if exists ${restoredName}`).execute(testDb())
}, 60_000)

afterAll(async () => {
  await restored?.destroy()
  await sql.raw(`drop database if exists ${restoredName}`).execute(testDb())
  rmSync(work, { recursive: true, force: true })
})

describe('backup and restore', () => {
  it('writes a backup, restores it into a fresh database, and finds every row of every table there, identical', async () => {
    execFileSync('bash', ['scripts/backup.sh', dumpFile], { cwd: ROOT, env: { ...process.env, NUXT_DATABASE_URL: sourceUrl() }, stdio: 'pipe' })
    await sql.raw(`create database ${restoredName}`).execute(testDb())
    execFileSync('bash', ['scripts/restore.sh', dumpFile, restoredUrl()], { cwd: ROOT, stdio: 'pipe' })
    restored = connect(restoredUrl(), 2)

    const names = await tables(testDb())
    expect(names).toContain('findings')
    expect(await tables(restored)).toEqual(names)
    let rows = 0
    for (const t of names) {
      const [a, b] = await Promise.all([fingerprint(testDb(), t), fingerprint(restored, t)])
      expect(b, t).toEqual(a)
      rows += a.rows
    }
    // Not an empty comparison: the scenario above wrote rows in many tables.
    expect(rows).toBeGreaterThan(50)
    for (const t of ['organisations', 'sites', 'assets', 'surveys', 'checks', 'findings', 'attachments', 'kysely_migration']) {
      expect((await fingerprint(restored, t)).rows, t).toBeGreaterThan(0)
    }
  })

  it('keeps the tenant wall (db/tenant-wall.ts) on every tenant table of the restored copy', async () => {
    const walls = (db: Kysely<any>) => sql<{ relname: string; walled: boolean; policies: string }>`
      select c.relname, c.relrowsecurity and c.relforcerowsecurity as walled,
        (select string_agg(p.polname::text || ':' || pg_get_expr(p.polqual, p.polrelid), ',') from pg_policy p where p.polrelid = c.oid) as policies
      from pg_class c join pg_namespace n on n.oid = c.relnamespace
      where n.nspname = 'public' and c.relkind = 'r' and exists (select 1 from pg_attribute a where a.attrelid = c.oid and a.attname = 'organisation_id')
      order by 1`.execute(db).then((r) => r.rows)
    const [source, copy] = await Promise.all([walls(testDb()), walls(restored!)])
    expect(source.length).toBeGreaterThan(30)
    expect(copy).toEqual(source)
    expect(copy.every((t) => t.walled)).toBe(true)
  })

  it('holds object keys that all still name stored objects', async () => {
    const keys = await restored!.selectFrom('attachments').select(['object_key', 'thumbnail_key']).where('state', '=', 'stored').execute()
    expect(keys.length).toBeGreaterThan(0)
    for (const k of keys) {
      expect(await objectExists(k.object_key), k.object_key).toBe(true)
      expect(await objectExists(k.thumbnail_key!), k.thumbnail_key!).toBe(true)
    }
  })

  it('refuses to restore over a database that has tables, and changes nothing there', async () => {
    const before = await fingerprint(testDb(), 'findings')
    const res = spawnSync('bash', ['scripts/restore.sh', dumpFile, sourceUrl()], { cwd: ROOT, encoding: 'utf8' })
    expect(res.status).toBe(3)
    expect(res.stderr).toMatch(/restore only into a new, empty database/)
    expect(await fingerprint(testDb(), 'findings')).toEqual(before)
  })
})
