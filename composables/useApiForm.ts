import type { z } from 'zod'
import { apiErrorOf, fieldErrorsFromZod } from '#shared/utils/field-errors'

export type FormResult<T> = { ok: true; data: T } | { ok: false; statusCode?: number }

type FetchOptions = NonNullable<Parameters<typeof $fetch>[1]>

// An organisation route, whose 403 means the person lost access: the org layout then replaces the page.
const ORG_ROUTE = /^\/api\/orgs\/[^/]+(\/|$)/

/**
 * State and helpers for one form that talks to the API: validates with a shared zod schema first,
 * submits with $fetch, and spreads the server's `{ message, fieldErrors }` over the form.
 */
export function useApiForm() {
  const pending = ref(false)
  const message = ref('')
  const fieldErrors = ref<Record<string, string[]>>({})
  const statusCode = ref<number>()
  const orgAccess = useOrgAccess()

  function reset() {
    message.value = ''
    fieldErrors.value = {}
    statusCode.value = undefined
  }

  /** First error message of a field (dotted path), for FormField's `error`. */
  function errorOf(field: string): string | undefined {
    return fieldErrors.value[field]?.[0]
  }

  /** Sets the errors by hand, for rules that live only on the client (e.g. "the passwords differ"). */
  function fail(msg: string, errors: Record<string, string[]> = {}) {
    message.value = msg
    fieldErrors.value = errors
  }

  /** Parses values with the schema; on failure fills the field errors and returns null. */
  function validate<S extends z.ZodType>(schema: S, values: unknown): z.output<S> | null {
    const result = schema.safeParse(values)
    if (result.success) {
      reset()
      return result.data
    }
    fail('Some answers need attention.', fieldErrorsFromZod(result.error))
    return null
  }

  /** Runs a request; errors land in `message` / `fieldErrors` instead of being thrown. */
  async function run<T>(request: () => Promise<T>, url?: string): Promise<FormResult<T>> {
    pending.value = true
    reset()
    try {
      return { ok: true, data: await request() }
    } catch (err) {
      const e = apiErrorOf(err)
      message.value = e.message
      fieldErrors.value = e.fieldErrors
      statusCode.value = e.statusCode
      if (e.statusCode === 403 && url && ORG_ROUTE.test(url)) orgAccess.report(e.message)
      return { ok: false, statusCode: e.statusCode }
    } finally {
      pending.value = false
    }
  }

  /** $fetch through `run`. */
  function submit<T = unknown>(url: string, options: FetchOptions = {}): Promise<FormResult<T>> {
    return run(() => $fetch(url, options) as Promise<T>, url)
  }

  return { pending, message, fieldErrors, statusCode, reset, errorOf, fail, validate, run, submit }
}
