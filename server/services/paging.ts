// Small helpers the list and edit services share.

/** Page maths for LIMIT/OFFSET. */
export function pageWindow(page: number, pageSize: number) {
  return { limit: pageSize, offset: (page - 1) * pageSize }
}

/** A LIKE pattern that matches `q` literally anywhere (%, _ and \ escaped). */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
}

/** 409 for an edit made on an older version of the row. */
export function changedMeanwhile(what: string) {
  return createError({
    statusCode: 409,
    statusMessage: 'Changed meanwhile',
    data: { message: `Someone else changed this ${what} while you were editing. Reload to see their changes, then try again.` },
  })
}

/** Numeric column (string from pg) → number or null. */
export function num(v: string | number | null | undefined): number | null {
  return v === null || v === undefined ? null : Number(v)
}

/** A PostgreSQL unique-violation error on the named constraint or index. */
export function isUniqueViolation(err: unknown, constraint: string): boolean {
  const e = err as { code?: string; constraint?: string }
  return e?.code === '23505' && e.constraint === constraint
}
