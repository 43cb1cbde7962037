// CSV exports of findings and checks. Each export walks the list service itself a page at a time, so a file has
// exactly the rows (and order) of the list with the same filters, and never holds the whole set in memory.
import { Readable } from 'node:stream'
import type { z } from 'zod'
import { csvLine, guardCell } from '#shared/csv'
import { CHECK_CSV_COLUMNS, FINDING_CSV_COLUMNS, WORK_ORDER_CSV_COLUMNS, type ExportColumn } from '#shared/exports-csv'
import type { findingListQuerySchema } from '#shared/schemas/survey'
import type { checkListQuerySchema } from '#shared/schemas/checks'
import type { WorkOrderListQuery } from '#shared/schemas/work-order'
import type { Page } from '#shared/types/programme'
import { listFindings } from './surveys'
import { listChecks } from './checks'
import { listWorkOrders } from './work-orders'

const EXPORT_PAGE = 100
// A UTF-8 byte-order mark lets spreadsheet programs read accents correctly.
const BOM = '\uFEFF'

function cell<T>(column: ExportColumn<T>, row: T): string | number | null {
  const v = column.value(row)
  // Text is guarded against spreadsheet formulas; numbers are written as they are.
  return typeof v === 'string' ? guardCell(v) : v
}

function csvOf<T>(columns: ReadonlyArray<ExportColumn<T>>, page: (n: number) => Promise<Page<T>>): Readable {
  return Readable.from((async function* () {
    yield BOM + csvLine(columns.map((c) => c.name))
    for (let n = 1; ; n++) {
      const { items, total } = await page(n)
      if (items.length) yield items.map((row) => csvLine(columns.map((c) => cell(c, row)))).join('')
      if (!items.length || n * EXPORT_PAGE >= total) return
    }
  })())
}

/** Findings as CSV, filtered like the findings list. */
export function exportFindings(ctx: MemberContext, q: z.output<typeof findingListQuerySchema>): Readable {
  return csvOf(FINDING_CSV_COLUMNS, (n) => listFindings(ctx, { ...q, page: n, pageSize: EXPORT_PAGE }))
}

/** Checks as CSV, filtered like the checks list. */
export function exportChecks(ctx: MemberContext, q: z.output<typeof checkListQuerySchema>): Readable {
  return csvOf(CHECK_CSV_COLUMNS, (n) => listChecks(ctx, { ...q, page: n, pageSize: EXPORT_PAGE }))
}

/** Work orders as CSV, filtered and sorted like the work-order list. */
export function exportWorkOrders(ctx: MemberContext, q: WorkOrderListQuery): Readable {
  return csvOf(WORK_ORDER_CSV_COLUMNS, (n) => listWorkOrders(ctx, { ...q, page: n, pageSize: EXPORT_PAGE }))
}
