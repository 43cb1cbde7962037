import type { z } from 'zod'

/** Turns zod issues into `{ "dotted.path": [messages] }`, the shape forms and API errors share. */
export function fieldErrorsFromZod(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {}
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '_'
    ;(out[key] ??= []).push(issue.message)
  }
  return out
}

/** Reads `{ message, fieldErrors }` from an error thrown by $fetch, whatever its exact shape. */
export function apiErrorOf(err: unknown): { message: string; fieldErrors: Record<string, string[]>; statusCode?: number } {
  const e = err as { data?: any; statusCode?: number; statusMessage?: string; message?: string }
  const data = e?.data?.data ?? e?.data ?? {}
  return {
    message: data.message ?? e?.statusMessage ?? 'Something went wrong. Please try again.',
    fieldErrors: data.fieldErrors ?? {},
    statusCode: e?.statusCode ?? e?.data?.statusCode,
  }
}
