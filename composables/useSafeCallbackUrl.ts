import type { LocationQueryValue } from 'vue-router'

/**
 * A callbackUrl from the query, accepted only as a path inside this app: an outside address
 * ("https://…", "//host", "/\\host") would turn the sign-in page into an open redirect.
 */
export function safeCallbackUrl(raw: LocationQueryValue | LocationQueryValue[] | undefined, fallback = '/'): string {
  const value = Array.isArray(raw) ? raw[0] : raw
  if (typeof value !== 'string' || !value.startsWith('/')) return fallback
  if (value.startsWith('//') || value.startsWith('/\\') || /[\u0000-\u001f]/.test(value)) return fallback
  return value
}
