// Shapes of the JSON the asset-register routes answer, as the client receives them (dates are ISO strings).
import type { AssetClass, SiteKind, SiteSafetyFlag } from '../register'

/** One page of a server-sorted list. */
export interface RegisterPage<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
}

/** GET /api/orgs/:org/sites (items) and GET /api/orgs/:org/sites/:id */
export interface SiteItem {
  id: string
  code: string
  name: string
  kind: SiteKind
  latitude: number | null
  longitude: number | null
  voltageKv: number | null
  accessNotes: string
  safetyNotes: string
  safetyFlags: SiteSafetyFlag[]
  /** Active assets at the site. */
  assetCount: number
  archivedAt: string | null
  version: number
  createdAt: string
  updatedAt: string
}

/** The site an asset belongs to, as asset rows carry it. */
export interface AssetSiteRef {
  id: string
  code: string
  name: string
  archived: boolean
}

/** GET /api/orgs/:org/assets (items) and GET /api/orgs/:org/assets/:id */
export interface AssetItem {
  id: string
  site: AssetSiteRef
  label: string
  assetClass: AssetClass
  manufacturer: string
  model: string
  voltageKv: number | null
  ratedCurrentA: number | null
  criticality: number
  condition: number
  components: string[]
  intervalMonths: number | null
  /** Next check due (YYYY-MM-DD) from the schedule rules; null when the schedule is unavailable. */
  dueOn: string | null
  archivedAt: string | null
  version: number
  createdAt: string
  updatedAt: string
}

export interface ImportProblemItem {
  /** Spreadsheet row number (header = row 1); 0 for a problem with the whole file. */
  row: number
  field: string
  message: string
}

/** GET /api/orgs/:org/register-imports/:id and the answers of its chunk, check and commit routes. */
export interface ImportSummary {
  id: string
  kind: 'sites' | 'assets'
  fileName: string
  status: 'receiving' | 'checked' | 'committed'
  /** Size of the file's text in characters, and how much of it has arrived. */
  totalChars: number
  receivedChars: number
  chunksReceived: number
  rowCount: number
  badRowCount: number
  insertedCount: number
  /** Problems with the file as a whole (missing columns, unreadable text). */
  fileProblems: ImportProblemItem[]
  /** Columns in the file that the import does not use. */
  ignoredColumns: string[]
  /** The first problems found, in row order (all of them through the problems route); empty until the check. */
  problems: ImportProblemItem[]
  /** How many problems the check found (0 while the file is still arriving). */
  problemCount: number
  /** Whether commit would write every row. */
  ready: boolean
  createdAt: string
  checkedAt: string | null
  committedAt: string | null
}
