// CSV import of sites or assets. The browser sends the file's text in pieces (each ending at a record boundary)
// to an import session stored in PostgreSQL; each piece is parsed and validated row by row as it arrives and
// staged in register_import_rows. "Check" then finds what needs the whole file and the register (duplicates,
// unknown site codes) with set-based SQL, and "commit" writes every staged row in one statement inside one
// transaction — all rows or none. All state lives in the database, so any app instance can take any request.
import { sql, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { RegisterImport, StoredProblem } from '~~/db/tables/register-imports'
import { isBlankRecord, parseCsv } from '#shared/csv'
import { mapHeader, readAssetRow, readSiteRow, rowKeys, type HeaderMap } from '#shared/register-csv'
import { IMPORT_MAX_ROWS, type ImportCreateInput } from '#shared/schemas/register'
import type { ImportProblemItem, ImportSummary } from '#shared/types/register'
import { isUniqueViolation, pageWindow } from './paging'
import { record } from './audit'
import { assertSiteRoom } from './plan-limits'

type Trx = Transaction<Database>

/** Problems listed in a summary; the rest are read page by page through the problems route. */
const SUMMARY_PROBLEMS = 50
/** Sessions not committed within this time are removed when the organisation starts another import. */
const STALE_AFTER_HOURS = 24
const INSERT_BATCH = 1000

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

async function sessionFor(trx: Trx, orgId: string, id: string): Promise<RegisterImport> {
  const row = await trx.selectFrom('register_imports').selectAll()
    .where('organisation_id', '=', orgId).where('id', '=', id)
    .forUpdate().executeTakeFirst()
  if (!row) throw notFound('Import')
  return row
}

/** Opens an import session for one file. */
export async function createImport(ctx: MemberContext, input: ImportCreateInput & { kind: 'sites' | 'assets' }): Promise<ImportSummary> {
  const db = useDb()
  await db.deleteFrom('register_imports')
    .where('organisation_id', '=', ctx.org.id)
    .where('status', '!=', 'committed')
    .where('created_at', '<', sql<Date>`now() - make_interval(hours => ${STALE_AFTER_HOURS})`)
    .execute()
  const { id } = await db.insertInto('register_imports').values({
    organisation_id: ctx.org.id,
    created_by: ctx.user.id,
    kind: input.kind,
    file_name: input.fileName,
    total_chars: input.totalChars,
    columns: null,
  }).returning('id').executeTakeFirstOrThrow()
  return importSummary(ctx, id)
}

/**
 * Takes piece `seq` of the file. Pieces arrive in order; a piece sent again (a retried request) is answered with
 * the current state and not staged twice.
 */
export async function receiveChunk(ctx: MemberContext, id: string, seq: number, text: string): Promise<ImportSummary> {
  await useDb().transaction().execute(async (trx) => {
    const session = await sessionFor(trx, ctx.org.id, id)
    if (session.status !== 'receiving') conflict('This file has already been checked. Start a new import to send it again.')
    if (seq < session.chunks_received) return
    if (seq > session.chunks_received) conflict(`Piece ${seq + 1} of the file arrived before piece ${session.chunks_received + 1}. Upload the file again.`)
    if (session.received_chars + text.length > session.total_chars) conflict('More text arrived than the file was said to hold. Upload the file again.')

    const parsed = parseCsv(text, session.records_seen + 1)
    let records = parsed.records
    let firstRecord = session.records_seen + 1
    let columns = session.columns
    const fileProblems: StoredProblem[] = [...session.file_problems]
    if (seq === 0) {
      const header = records[0] ?? []
      columns = header.map((h) => h.trim())
      fileProblems.push(...mapHeader(session.kind, header).problems)
      if (!header.length || isBlankRecord(header)) fileProblems.push({ field: '', message: 'The first row must name the columns (see the expected columns).' })
      records = records.slice(1)
      firstRecord += 1
    }
    const header = mapHeader(session.kind, columns ?? [])
    const errorsByRecord = new Map<number, string>()
    for (const e of parsed.errors) errorsByRecord.set(e.record, e.message)

    const staged: Array<{ row_no: number; key_code: string | null; key_label: string | null; data: string | null; problems: string }> = []
    let rowCount = session.row_count
    let badRows = 0
    let tooMany = false
    records.forEach((record, i) => {
      const rowNo = firstRecord + i
      if (isBlankRecord(record) && !errorsByRecord.has(rowNo)) return
      if (rowCount >= IMPORT_MAX_ROWS) {
        tooMany = true
        return
      }
      rowCount++
      const result = stageRow(session.kind, record, header)
      const problems = [...result.problems]
      const parseError = errorsByRecord.get(rowNo)
      if (parseError) problems.unshift({ field: '', message: parseError })
      if (problems.length) badRows++
      const keys = rowKeys(session.kind, record, header)
      staged.push({
        row_no: rowNo,
        key_code: keys.code,
        key_label: keys.label,
        data: problems.length ? null : JSON.stringify(result.data),
        problems: JSON.stringify(problems),
      })
    })
    if (tooMany && !fileProblems.some((p) => p.field === 'rows')) {
      fileProblems.push({ field: 'rows', message: `The file has more than ${IMPORT_MAX_ROWS.toLocaleString('en-GB')} rows. Split it into smaller files.` })
    }
    for (let i = 0; i < staged.length; i += INSERT_BATCH) {
      await trx.insertInto('register_import_rows')
        .values(staged.slice(i, i + INSERT_BATCH).map((r) => ({ ...r, organisation_id: ctx.org.id, import_id: id })))
        .execute()
    }
    await trx.updateTable('register_imports').set({
      columns,
      file_problems: JSON.stringify(fileProblems),
      chunks_received: session.chunks_received + 1,
      received_chars: session.received_chars + text.length,
      records_seen: session.records_seen + parsed.records.length,
      row_count: rowCount,
      bad_row_count: session.bad_row_count + badRows,
      updated_at: new Date(),
    }).where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
  })
  return importSummary(ctx, id)
}

function stageRow(kind: 'sites' | 'assets', record: readonly string[], header: HeaderMap) {
  return kind === 'sites' ? readSiteRow(record, header) : readAssetRow(record, header)
}

// The checks that need the whole file and the register. Recomputed from scratch each time, because the register
// may have changed since the last check.
async function crossCheck(trx: Trx, orgId: string, session: RegisterImport): Promise<number> {
  const id = session.id
  await sql`update register_import_rows set cross_problems = '[]'::jsonb
    where import_id = ${id} and organisation_id = ${orgId} and cross_problems <> '[]'::jsonb`.execute(trx)
  const add = (field: string, message: ReturnType<typeof sql>) =>
    sql`r.cross_problems || jsonb_build_array(jsonb_build_object('field', ${field}::text, 'message', ${message}))`
  if (session.kind === 'sites') {
    await sql`with firsts as (
        select key_code, min(row_no) as first_row from register_import_rows
        where import_id = ${id} and organisation_id = ${orgId} and key_code is not null
        group by key_code having count(*) > 1)
      update register_import_rows r set cross_problems = ${add('code', sql`format('The code %s is also on row %s of this file. Each site needs its own code.', r.key_code, f.first_row)`)}
      from firsts f
      where r.import_id = ${id} and r.organisation_id = ${orgId} and r.key_code = f.key_code and r.row_no > f.first_row`.execute(trx)
    await sql`update register_import_rows r set cross_problems = ${add('code', sql`format('The code %s is already in the register (%s%s). Use another code, or leave this row out.', r.key_code, s.name, case when s.archived_at is null then '' else ', archived' end)`)}
      from sites s
      where r.import_id = ${id} and r.organisation_id = ${orgId} and s.organisation_id = ${orgId} and s.code = r.key_code`.execute(trx)
  } else {
    await sql`update register_import_rows r set cross_problems = ${add('site_code', sql`format('No site with the code %s is in the register. Add the site (or import the sites file) first.', r.key_code)`)}
      where r.import_id = ${id} and r.organisation_id = ${orgId} and r.key_code is not null
        and not exists (select 1 from sites s where s.organisation_id = ${orgId} and s.code = r.key_code)`.execute(trx)
    await sql`update register_import_rows r set cross_problems = ${add('site_code', sql`format('The site %s is archived. Restore it before adding assets to it.', r.key_code)`)}
      from sites s
      where r.import_id = ${id} and r.organisation_id = ${orgId} and s.organisation_id = ${orgId} and s.code = r.key_code and s.archived_at is not null`.execute(trx)
    await sql`with firsts as (
        select key_code, key_label, min(row_no) as first_row from register_import_rows
        where import_id = ${id} and organisation_id = ${orgId} and key_code is not null and key_label is not null
        group by key_code, key_label having count(*) > 1)
      update register_import_rows r set cross_problems = ${add('label', sql`format('The label %s at site %s is also on row %s of this file. Labels are unique within a site.', r.key_label, r.key_code, f.first_row)`)}
      from firsts f
      where r.import_id = ${id} and r.organisation_id = ${orgId} and r.key_code = f.key_code and r.key_label = f.key_label and r.row_no > f.first_row`.execute(trx)
    await sql`update register_import_rows r set cross_problems = ${add('label', sql`format('Site %s already has an asset labelled %s in the register%s.', r.key_code, r.key_label, case when a.archived_at is null then '' else ' (archived)' end)`)}
      from sites s join assets a on a.organisation_id = s.organisation_id and a.site_id = s.id
      where r.import_id = ${id} and r.organisation_id = ${orgId} and s.organisation_id = ${orgId}
        and s.code = r.key_code and a.label = r.key_label`.execute(trx)
  }
  const { n } = await trx.selectFrom('register_import_rows').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('import_id', '=', id).where('organisation_id', '=', orgId)
    .where((eb) => eb.or([eb('problems', '<>', sql<any>`'[]'::jsonb`), eb('cross_problems', '<>', sql<any>`'[]'::jsonb`)]))
    .executeTakeFirstOrThrow()
  return Number(n)
}

function assertComplete(session: RegisterImport) {
  if (session.chunks_received === 0 || session.received_chars < session.total_chars) {
    conflict(`The upload is not complete: ${session.received_chars.toLocaleString('en-GB')} of ${session.total_chars.toLocaleString('en-GB')} characters arrived. Upload the file again.`)
  }
}

/** Runs the whole-file checks once every piece has arrived; the answer is the preview. */
export async function checkImport(ctx: MemberContext, id: string): Promise<ImportSummary> {
  await useDb().transaction().execute(async (trx) => {
    const session = await sessionFor(trx, ctx.org.id, id)
    if (session.status === 'committed') conflict('This file has already been imported.')
    assertComplete(session)
    const bad = await crossCheck(trx, ctx.org.id, session)
    await trx.updateTable('register_imports')
      .set({ status: 'checked', bad_row_count: bad, checked_at: new Date(), updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
  })
  return importSummary(ctx, id)
}

/**
 * Writes every row of a checked file in one transaction, after checking again against the register as it is
 * now. Any problem, or a clash with a change made meanwhile, leaves the register exactly as it was.
 */
export async function commitImport(ctx: MemberContext, id: string): Promise<ImportSummary> {
  let refusal: string | null = null
  try {
    await useDb().transaction().execute(async (trx) => {
      const session = await sessionFor(trx, ctx.org.id, id)
      if (session.status === 'committed') conflict('This file has already been imported.')
      if (session.status !== 'checked') conflict('Check the file before importing it.')
      assertComplete(session)
      const bad = await crossCheck(trx, ctx.org.id, session)
      const fileProblems = session.file_problems.length
      if (bad > 0 || fileProblems > 0 || session.row_count === 0) {
        refusal = session.row_count === 0
          ? 'The file has no rows to import.'
          : `Nothing was imported: ${bad > 0 ? `${bad.toLocaleString('en-GB')} ${bad === 1 ? 'row has' : 'rows have'} problems` : 'the file has problems'}. Fix the file and upload it again.`
        // The fresh check results are kept (the transaction commits them) so the preview shows them.
        await trx.updateTable('register_imports').set({ bad_row_count: bad, checked_at: new Date(), updated_at: new Date() })
          .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
        return
      }
      if (session.kind === 'sites') await assertSiteRoom(trx, ctx.org.id, session.row_count)
      const inserted = session.kind === 'sites' ? await insertSites(trx, ctx.org.id, id) : await insertAssets(trx, ctx.org.id, id)
      if (inserted !== session.row_count) throw new Error(`import ${id}: staged ${session.row_count} rows, inserted ${inserted}`)
      await trx.deleteFrom('register_import_rows').where('organisation_id', '=', ctx.org.id).where('import_id', '=', id).execute()
      await trx.updateTable('register_imports')
        .set({ status: 'committed', inserted_count: inserted, bad_row_count: 0, committed_at: new Date(), updated_at: new Date() })
        .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
      await record(trx, { ctx, action: 'register.import_committed', target: { kind: 'register_import', id, label: session.file_name }, details: { kind: session.kind, rows: inserted } })
    })
  } catch (err) {
    if (isUniqueViolation(err, 'sites_org_code_key') || isUniqueViolation(err, 'assets_site_label_key')) {
      conflict('The register changed while the file was being imported; nothing was imported. Check the file again.')
    }
    throw err
  }
  if (refusal) {
    throw createError({ statusCode: 422, statusMessage: 'Rows need attention', data: { message: refusal, summary: await importSummary(ctx, id) } })
  }
  return importSummary(ctx, id)
}

async function insertSites(trx: Trx, orgId: string, id: string): Promise<number> {
  const result = await sql`insert into sites (organisation_id, code, name, kind, latitude, longitude, voltage_kv, access_notes, safety_notes, safety_flags)
    select r.organisation_id, r.data->>'code', r.data->>'name', r.data->>'kind', (r.data->>'latitude')::float8, (r.data->>'longitude')::float8,
      (r.data->>'voltageKv')::numeric, r.data->>'accessNotes', r.data->>'safetyNotes',
      array(select jsonb_array_elements_text(r.data->'safetyFlags'))
    from register_import_rows r
    where r.import_id = ${id} and r.organisation_id = ${orgId}
    order by r.row_no`.execute(trx)
  return Number(result.numAffectedRows ?? 0)
}

async function insertAssets(trx: Trx, orgId: string, id: string): Promise<number> {
  // The site is found by code inside the same organisation: a file can never attach assets to another tenant.
  const result = await sql`insert into assets (organisation_id, site_id, label, asset_class, manufacturer, model, voltage_kv, rated_current_a,
      criticality, condition, components, interval_months)
    select r.organisation_id, s.id, r.data->>'label', r.data->>'assetClass', r.data->>'manufacturer', r.data->>'model',
      (r.data->>'voltageKv')::numeric, (r.data->>'ratedCurrentA')::numeric, (r.data->>'criticality')::smallint,
      (r.data->>'condition')::smallint, array(select jsonb_array_elements_text(r.data->'components')),
      (r.data->>'intervalMonths')::smallint
    from register_import_rows r
    join sites s on s.organisation_id = r.organisation_id and s.code = r.key_code
    where r.import_id = ${id} and r.organisation_id = ${orgId}
    order by r.row_no`.execute(trx)
  return Number(result.numAffectedRows ?? 0)
}

const problemsOf = (orgId: string, id: string) => sql<ImportProblemItem>`
  select r.row_no as "row", p->>'field' as "field", p->>'message' as "message"
  from register_import_rows r
  cross join lateral jsonb_array_elements(r.problems || r.cross_problems) with ordinality as e(p, n)
  where r.import_id = ${id} and r.organisation_id = ${orgId}
    and (r.problems <> '[]'::jsonb or r.cross_problems <> '[]'::jsonb)
  order by r.row_no, e.n`

/** The session's state and the first problems, as the import page shows them. */
export async function importSummary(ctx: MemberContext, id: string): Promise<ImportSummary> {
  const db = useDb()
  const s = await db.selectFrom('register_imports').selectAll().where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
  if (!s) throw notFound('Import')
  // While pieces arrive the page shows progress only; the problems are listed once the whole file is checked.
  const [problems, count] = s.status === 'receiving'
    ? [{ rows: [] as ImportProblemItem[] }, { rows: [{ n: 0 }] }]
    : await Promise.all([
      sql<ImportProblemItem>`select * from (${problemsOf(ctx.org.id, id)}) p limit ${SUMMARY_PROBLEMS}`.execute(db),
      sql<{ n: number }>`select count(*)::int as n from register_import_rows r, jsonb_array_elements(r.problems || r.cross_problems)
        where r.import_id = ${id} and r.organisation_id = ${ctx.org.id}`.execute(db),
    ])
  const fileProblems = s.file_problems.map((p) => ({ row: 0, field: p.field, message: p.message }))
  const ignored = s.columns ? mapHeader(s.kind, s.columns).ignored : []
  return {
    id: s.id,
    kind: s.kind,
    fileName: s.file_name,
    status: s.status,
    totalChars: s.total_chars,
    receivedChars: s.received_chars,
    chunksReceived: s.chunks_received,
    rowCount: s.row_count,
    badRowCount: s.bad_row_count,
    insertedCount: s.inserted_count,
    fileProblems,
    ignoredColumns: ignored,
    problems: problems.rows,
    problemCount: count.rows[0]?.n ?? 0,
    ready: s.status === 'checked' && s.bad_row_count === 0 && fileProblems.length === 0 && s.row_count > 0,
    createdAt: s.created_at.toISOString(),
    checkedAt: s.checked_at?.toISOString() ?? null,
    committedAt: s.committed_at?.toISOString() ?? null,
  }
}

/** Every problem of the file, a page at a time, in row order. */
export async function importProblems(ctx: MemberContext, id: string, page: number, pageSize: number) {
  const db = useDb()
  const s = await db.selectFrom('register_imports').select('file_problems').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
  if (!s) throw notFound('Import')
  const { limit, offset } = pageWindow(page, pageSize)
  const [rows, count] = await Promise.all([
    sql<ImportProblemItem>`select * from (${problemsOf(ctx.org.id, id)}) p limit ${limit} offset ${offset}`.execute(db),
    sql<{ n: number }>`select count(*)::int as n from register_import_rows r, jsonb_array_elements(r.problems || r.cross_problems)
      where r.import_id = ${id} and r.organisation_id = ${ctx.org.id}`.execute(db),
  ])
  return { items: rows.rows, total: count.rows[0]?.n ?? 0, page, pageSize }
}
