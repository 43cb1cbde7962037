// The CSV columns of the asset register (import and export use the same ones) and how one row of text becomes
// validated values. Pure code: the server validates uploads with it, the import page and README list the columns.
import type { z } from 'zod'
import {
  ASSET_CLASSES, ASSET_CLASS_LABELS, SITE_KINDS, SITE_KIND_LABELS, SITE_SAFETY_FLAGS, SITE_SAFETY_FLAG_LABELS,
  type AssetClass, type SiteKind, type SiteSafetyFlag,
} from './register'
import { assetCreateSchema, siteCreateSchema, type AssetValues, type SiteValues } from './schemas/register'
import { unguardCell } from './csv'

export type RegisterCsvKind = 'sites' | 'assets'

export interface CsvColumn {
  /** Header as written in the file. */
  name: string
  /** The field of the API input it fills (problems are reported under the column name). */
  field: string
  required: boolean
  type: 'text' | 'number' | 'whole number' | 'choice' | 'list'
  description: string
  example: string
}

export const SITE_CSV_COLUMNS: readonly CsvColumn[] = [
  { name: 'code', field: 'code', required: true, type: 'text', description: 'Unique code of the site in your organisation (letters, digits, . _ / -).', example: 'LMV-01' },
  { name: 'name', field: 'name', required: true, type: 'text', description: 'Name of the site.', example: 'Lowmoor Grid' },
  { name: 'kind', field: 'kind', required: true, type: 'choice', description: `One of: ${SITE_KINDS.join(', ')} (or the label, e.g. "Plant room").`, example: 'substation' },
  { name: 'latitude', field: 'latitude', required: true, type: 'number', description: 'Decimal degrees, -90 to 90 (WGS 84).', example: '54.3712' },
  { name: 'longitude', field: 'longitude', required: true, type: 'number', description: 'Decimal degrees, -180 to 180 (WGS 84).', example: '-2.9081' },
  { name: 'voltage_kv', field: 'voltageKv', required: false, type: 'number', description: 'Highest nominal voltage at the site, in kV.', example: '132' },
  { name: 'access_notes', field: 'accessNotes', required: false, type: 'text', description: 'Address, gate, keys, who to call.', example: 'Key safe at the main gate' },
  { name: 'safety_notes', field: 'safetyNotes', required: false, type: 'text', description: 'Anything a thermographer must know before entering.', example: 'Call control before entry' },
  { name: 'safety_flags', field: 'safetyFlags', required: false, type: 'list', description: `Separated by ";": ${SITE_SAFETY_FLAGS.join(', ')}.`, example: 'permit_required;work_in_pairs' },
]

export const ASSET_CSV_COLUMNS: readonly CsvColumn[] = [
  { name: 'site_code', field: 'siteCode', required: true, type: 'text', description: 'Code of a site already in the register (import sites first).', example: 'LMV-01' },
  { name: 'label', field: 'label', required: true, type: 'text', description: 'Label or position, unique within its site.', example: 'T1' },
  { name: 'asset_class', field: 'assetClass', required: true, type: 'choice', description: `One of: ${ASSET_CLASSES.join(', ')} (or the label, e.g. "Surge arrester").`, example: 'transformer' },
  { name: 'manufacturer', field: 'manufacturer', required: false, type: 'text', description: 'Free text.', example: 'Hallam Electric' },
  { name: 'model', field: 'model', required: false, type: 'text', description: 'Free text.', example: 'HX-40' },
  { name: 'voltage_kv', field: 'voltageKv', required: false, type: 'number', description: 'Nominal voltage in kV.', example: '33' },
  { name: 'rated_current_a', field: 'ratedCurrentA', required: false, type: 'number', description: 'Rated current in A (used to scale readings to full load).', example: '800' },
  { name: 'criticality', field: 'criticality', required: false, type: 'whole number', description: '1 (low) to 5 (highest); 3 when blank.', example: '4' },
  { name: 'condition', field: 'condition', required: false, type: 'whole number', description: '1 good, 2 fair, 3 poor (NFPA 70B); 1 when blank.', example: '1' },
  { name: 'components', field: 'components', required: false, type: 'list', description: 'Components or phases to check, separated by ";"; A;B;C when blank.', example: 'A;B;C;N' },
  { name: 'interval_months', field: 'intervalMonths', required: false, type: 'whole number', description: 'Inspection interval override, 1 to 60 months; blank follows the organisation rule.', example: '6' },
]

/** The columns of one kind of register file. */
export function csvColumns(kind: RegisterCsvKind): readonly CsvColumn[] {
  return kind === 'sites' ? SITE_CSV_COLUMNS : ASSET_CSV_COLUMNS
}

export interface CsvProblem {
  /** The column name as in the file, or '' for the whole row or file. */
  field: string
  message: string
}

export interface HeaderMap {
  /** Column name → position in the record. */
  positions: Record<string, number>
  problems: CsvProblem[]
  /** Columns present but not used (reported as a note, not an error). */
  ignored: string[]
}

const normalise = (h: string) => h.trim().toLowerCase().replace(/[\s-]+/g, '_').replace(/[()]/g, '')
const ALIASES: Record<string, string> = { class: 'asset_class', site: 'site_code', voltage: 'voltage_kv', rated_current: 'rated_current_a', interval: 'interval_months', lat: 'latitude', lon: 'longitude', lng: 'longitude' }

/** Reads a header record: where each known column is, which required ones are missing, which are unknown. */
export function mapHeader(kind: RegisterCsvKind, header: readonly string[]): HeaderMap {
  const columns = csvColumns(kind)
  const known = new Set(columns.map((c) => c.name))
  const positions: Record<string, number> = {}
  const problems: CsvProblem[] = []
  const ignored: string[] = []
  header.forEach((raw, index) => {
    const key = normalise(raw)
    const name = known.has(key) ? key : ALIASES[key]
    if (!key) return
    if (!name || !known.has(name)) {
      ignored.push(raw.trim())
      return
    }
    if (name in positions) {
      problems.push({ field: name, message: `The column "${name}" appears twice in the header. Keep one.` })
      return
    }
    positions[name] = index
  })
  for (const c of columns) {
    if (c.required && !(c.name in positions)) problems.push({ field: c.name, message: `The header has no "${c.name}" column. Add it (see the expected columns).` })
  }
  return { positions, problems, ignored }
}

export interface RowResult<T> {
  data: T | null
  problems: CsvProblem[]
}

export type SiteRow = SiteValues
export type AssetRow = Omit<AssetValues, 'siteId'> & { siteCode: string }

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/

function lookup<K extends string>(value: string, keys: readonly K[], labels: Record<K, string>): K | undefined {
  const v = value.trim().toLowerCase()
  const norm = v.replace(/[\s-]+/g, '_')
  return keys.find((k) => k === norm || labels[k].toLowerCase() === v)
}

/** Turns one record into the raw values of its columns; numbers, choices and lists are read with plain messages. */
function readCells(kind: RegisterCsvKind, record: readonly string[], header: HeaderMap) {
  const values: Record<string, unknown> = {}
  const problems: CsvProblem[] = []
  for (const column of csvColumns(kind)) {
    const at = header.positions[column.name]
    if (at === undefined) continue
    const cell = unguardCell((record[at] ?? '').trim())
    if (cell === '') continue
    if (column.type === 'number' || column.type === 'whole number') {
      const plain = cell.replace(/[\u00a0\u202f ]/g, '')
      if (!NUMBER.test(plain)) {
        const hint = /^\d+,\d+$/.test(plain) ? ' Use a point as the decimal separator.' : ''
        problems.push({ field: column.name, message: `"${cell}" is not a number. Write digits only, like ${column.example}.${hint}` })
        continue
      }
      values[column.field] = Number(plain)
    } else if (column.name === 'kind') {
      const k = lookup<SiteKind>(cell, SITE_KINDS, SITE_KIND_LABELS)
      if (k) values.kind = k
      else problems.push({ field: column.name, message: `Unknown kind "${cell}". Use one of: ${SITE_KINDS.join(', ')}.` })
    } else if (column.name === 'asset_class') {
      const k = lookup<AssetClass>(cell, ASSET_CLASSES, ASSET_CLASS_LABELS)
      if (k) values.assetClass = k
      else problems.push({ field: column.name, message: `Unknown class "${cell}". Use one of: ${ASSET_CLASSES.join(', ')}.` })
    } else if (column.name === 'safety_flags') {
      const flags: SiteSafetyFlag[] = []
      for (const part of cell.split(';').map((p) => p.trim()).filter(Boolean)) {
        const f = lookup<SiteSafetyFlag>(part, SITE_SAFETY_FLAGS, SITE_SAFETY_FLAG_LABELS)
        if (f) flags.push(f)
        else problems.push({ field: column.name, message: `Unknown safety flag "${part}". Use: ${SITE_SAFETY_FLAGS.join(', ')}.` })
      }
      values.safetyFlags = flags
    } else if (column.type === 'list') {
      values[column.field] = cell.split(';').map((p) => p.trim()).filter(Boolean)
    } else {
      values[column.field] = cell
    }
  }
  return { values, problems }
}

// zod issues come back under API field names; the person reads column names.
function zodProblems(kind: RegisterCsvKind, error: z.ZodError, already: CsvProblem[]): CsvProblem[] {
  const byField = new Map(csvColumns(kind).map((c) => [c.field, c.name]))
  const out: CsvProblem[] = []
  for (const issue of error.issues) {
    const field = byField.get(String(issue.path[0] ?? '')) ?? String(issue.path[0] ?? '')
    if (already.some((p) => p.field === field) || out.some((p) => p.field === field)) continue
    out.push({ field, message: issue.message })
  }
  return out
}

function inColumnOrder(kind: RegisterCsvKind, problems: CsvProblem[]): CsvProblem[] {
  const order = csvColumns(kind).map((c) => c.name)
  return problems.sort((a, b) => order.indexOf(a.field) - order.indexOf(b.field))
}

/** Validates one data record of a sites file. */
export function readSiteRow(record: readonly string[], header: HeaderMap): RowResult<SiteRow> {
  const { values, problems } = readCells('sites', record, header)
  const parsed = siteCreateSchema.safeParse(values)
  if (!parsed.success) problems.push(...zodProblems('sites', parsed.error, problems))
  return problems.length ? { data: null, problems: inColumnOrder('sites', problems) } : { data: parsed.data!, problems }
}

const assetRowSchema = assetCreateSchema.omit({ siteId: true })

/** Validates one data record of an assets file (the site code is checked against the register later). */
export function readAssetRow(record: readonly string[], header: HeaderMap): RowResult<AssetRow> {
  const { values, problems } = readCells('assets', record, header)
  const code = typeof values.siteCode === 'string' ? values.siteCode : ''
  if (!code && !problems.some((p) => p.field === 'site_code')) problems.push({ field: 'site_code', message: 'Enter the code of the site this asset is at.' })
  const parsed = assetRowSchema.safeParse(values)
  if (!parsed.success) problems.push(...zodProblems('assets', parsed.error, problems))
  return problems.length ? { data: null, problems: inColumnOrder('assets', problems) } : { data: { ...parsed.data!, siteCode: code }, problems }
}

/** The key fields of a row, kept even when other fields are wrong so that duplicates are still found. */
export function rowKeys(kind: RegisterCsvKind, record: readonly string[], header: HeaderMap): { code: string | null; label: string | null } {
  const cell = (name: string) => {
    const at = header.positions[name]
    const v = at === undefined ? '' : unguardCell((record[at] ?? '').trim())
    return v || null
  }
  return kind === 'sites' ? { code: cell('code'), label: null } : { code: cell('site_code'), label: cell('label') }
}
