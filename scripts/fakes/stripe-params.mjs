// Request decoding and response shaping shared by the Stripe fake: Stripe's bracketed form encoding
// (`items[0][price]=…`, `expand[]=…`), its list envelope with cursor pagination, and `expand`.

const UNSAFE_KEYS = new Set(['__proto__', 'constructor', 'prototype'])

/**
 * Decodes a Stripe form body or query string into nested objects and arrays (values stay strings).
 * @param {string} encoded
 * @returns {Record<string, any>}
 */
export function parseStripeForm(encoded) {
  /** @type {Record<string, any>} */
  const root = {}
  for (const [rawKey, value] of new URLSearchParams(encoded)) {
    const match = rawKey.match(/^([^[\]]+)((?:\[[^[\]]*\])*)$/)
    if (!match) continue
    const parts = [match[1], ...[...match[2].matchAll(/\[([^[\]]*)\]/g)].map((m) => m[1])]
    if (parts.some((p) => UNSAFE_KEYS.has(p))) continue
    /** @type {any} */
    let node = root
    for (let i = 0; i < parts.length; i++) {
      // `expand[]=a&expand[]=b` appends; numbered keys are turned into arrays afterwards.
      const key = parts[i] === '' ? String(Object.keys(node).length) : parts[i]
      if (i === parts.length - 1) node[key] = value
      else node = node[key] = typeof node[key] === 'object' ? node[key] : {}
    }
  }
  return arraysFromIndexedObjects(root)
}

/** @param {any} node */
function arraysFromIndexedObjects(node) {
  if (typeof node !== 'object' || node === null) return node
  const keys = Object.keys(node)
  for (const k of keys) node[k] = arraysFromIndexedObjects(node[k])
  if (keys.length > 0 && keys.every((k) => /^\d+$/.test(k))) {
    return keys.sort((a, b) => Number(a) - Number(b)).map((k) => node[k])
  }
  return node
}

/** Stripe sends booleans as the strings "true"/"false". */
export function bool(/** @type {unknown} */ value, fallback = false) {
  if (value === undefined || value === '') return fallback
  return value === true || value === 'true'
}

/** Parses an integer parameter; undefined when absent. */
export function int(/** @type {unknown} */ value) {
  if (value === undefined || value === '') return undefined
  const n = Number(value)
  if (!Number.isInteger(n)) throw new TypeError(`Invalid integer: ${value}`)
  return n
}

/** Metadata update semantics: a key set to "" is removed. */
export function mergeMetadata(/** @type {Record<string, string>} */ current, /** @type {unknown} */ patch) {
  if (patch === '') return {}
  if (typeof patch !== 'object' || patch === null) return current
  const next = { ...current }
  for (const [k, v] of Object.entries(patch)) {
    if (v === '') delete next[k]
    else next[k] = String(v)
  }
  return next
}

/**
 * Wraps objects (newest first) in Stripe's list envelope honouring limit / starting_after / ending_before.
 * @param {any[]} newestFirst
 * @param {Record<string, any>} query
 * @param {string} url
 */
export function listEnvelope(newestFirst, query, url) {
  const limit = Math.min(Math.max(int(query.limit) ?? 10, 1), 100)
  let items = newestFirst
  if (query.starting_after) {
    const at = items.findIndex((o) => o.id === query.starting_after)
    items = at >= 0 ? items.slice(at + 1) : []
  } else if (query.ending_before) {
    const at = items.findIndex((o) => o.id === query.ending_before)
    items = at >= 0 ? items.slice(Math.max(0, at - limit), at) : []
    return { object: 'list', data: items, has_more: at - limit > 0, url }
  }
  return { object: 'list', data: items.slice(0, limit), has_more: items.length > limit, url }
}

/**
 * Applies `expand` paths (e.g. "customer", "items.data.price.product", "data.subscription") to a deep copy.
 * @param {any} object
 * @param {string[]} paths
 * @param {(id: string) => any} lookup returns the stored object for an id, or undefined
 */
export function expand(object, paths, lookup) {
  const copy = structuredClone(object)
  for (const path of paths) expandPath(copy, path.split('.'), lookup)
  return copy
}

/** @param {any} node @param {string[]} parts @param {(id: string) => any} lookup */
function expandPath(node, parts, lookup) {
  if (!node || typeof node !== 'object' || parts.length === 0) return
  if (Array.isArray(node)) {
    for (const child of node) expandPath(child, parts, lookup)
    return
  }
  const [head, ...rest] = parts
  if (rest.length === 0) {
    if (typeof node[head] === 'string') {
      const found = lookup(node[head])
      if (found) node[head] = structuredClone(found)
    }
    return
  }
  if (typeof node[head] === 'string') {
    const found = lookup(node[head])
    if (found) node[head] = structuredClone(found)
  }
  expandPath(node[head], rest, lookup)
}
