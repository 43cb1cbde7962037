// The OpenAPI 3.1 document of Greybody's token API. Parameters and request bodies are generated from the same zod
// schemas the routes validate with (z.toJSONSchema); response objects are written out here from shared/types.
import { z } from 'zod'
import { findingListQuerySchema } from './schemas/survey'
import { checkListQuerySchema } from './schemas/checks'
import { trendQuerySchema } from './schemas/trends'
import { workOrderListQuerySchema, workOrderMoveSchema, WORK_ORDER_STATES } from './schemas/work-order'
import { TOKEN_RATE_PER_MINUTE } from './api-tokens'
import { FINDING_CSV_COLUMNS, CHECK_CSV_COLUMNS, WORK_ORDER_CSV_COLUMNS } from './exports-csv'

type Json = Record<string, unknown>

/** JSON Schema of a zod schema as a client sends it; the long uuid regex is left to `format: uuid`. */
export function jsonSchemaOf(schema: z.ZodType): Json {
  const out = z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any', target: 'draft-2020-12' }) as Json
  delete out.$schema
  const strip = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(strip)
    if (v && typeof v === 'object') {
      const o = { ...(v as Json) }
      if (o.format === 'uuid') delete o.pattern
      for (const k of Object.keys(o)) o[k] = strip(o[k])
      return o
    }
    return v
  }
  return strip(out) as Json
}

/** Query parameters from a zod object schema (one parameter per property). */
export function queryParameters(schema: z.ZodType, descriptions: Record<string, string> = {}): Json[] {
  const s = jsonSchemaOf(schema) as { properties?: Record<string, Json>; required?: string[] }
  return Object.entries(s.properties ?? {}).map(([name, prop]) => ({
    name, in: 'query', required: (s.required ?? []).includes(name), schema: prop,
    ...(descriptions[name] ? { description: descriptions[name] } : {}),
  }))
}

const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` })
const nullable = (type: string) => ({ type: [type, 'null'] })
const page = (item: string) => ({
  type: 'object', required: ['items', 'total', 'page', 'pageSize'],
  properties: { items: { type: 'array', items: ref(item) }, total: { type: 'integer' }, page: { type: 'integer' }, pageSize: { type: 'integer' } },
})
const json = (schema: Json, description: string) => ({ description, content: { 'application/json': { schema } } })
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { $ref: `#/components/responses/E${c}` }]))
const orgParam = { name: 'org', in: 'path', required: true, schema: { type: 'string' }, description: 'The organisation slug (as in the app URL /orgs/<slug>). Must be the token\'s own organisation.' }
const idParam = (what: string) => ({ name: 'id', in: 'path', required: true, schema: { type: 'string', format: 'uuid' }, description: `Identifier of the ${what}.` })
const csvDescription = (columns: ReadonlyArray<{ name: string; description: string }>) =>
  `CSV (RFC 4180, UTF-8 with a byte-order mark, CRLF). Columns in this order: ${columns.map((c) => `\`${c.name}\` — ${c.description}`).join('; ')}`

const reading = {
  type: 'object',
  properties: {
    apparentC: { type: 'number' }, referenceC: nullable('number'), ambientC: nullable('number'), emissivity: { type: 'number' },
    reflectedC: { type: 'number' }, reflectedMethod: { type: 'string', enum: ['reflector', 'direct', 'estimated'] }, distanceM: nullable('number'),
    transmittance: nullable('number'), windowTransmittance: nullable('number'), windowC: nullable('number'),
    loadA: nullable('number'), ratedA: nullable('number'), windMs: nullable('number'),
  },
}

const schemas: Json = {
  Error: {
    type: 'object',
    properties: {
      statusCode: { type: 'integer' }, statusMessage: { type: 'string' },
      data: { type: 'object', properties: { message: { type: 'string' }, fieldErrors: { type: 'object', additionalProperties: { type: 'array', items: { type: 'string' } } } } },
    },
  },
  Finding: {
    type: 'object',
    description: 'A finding: the reading as typed (°C, m, A) and what Greybody computed from it. Bands: 1 is the most severe.',
    required: ['id', 'surveyId', 'assetId', 'component', 'objectC', 'band', 'effectiveBand'],
    properties: {
      id: { type: 'string', format: 'uuid' }, checkId: { type: 'string', format: 'uuid' }, assetId: { type: 'string', format: 'uuid' },
      surveyId: { type: 'string', format: 'uuid' }, plannedFor: { type: 'string', format: 'date' }, siteName: { type: 'string' }, assetLabel: { type: 'string' },
      component: { type: 'string' }, phase: { type: 'string' }, inputs: reading,
      probableCause: { type: 'string' }, causeNotes: { type: 'string' }, notes: { type: 'string' },
      objectC: { type: 'number', description: 'Corrected object temperature, °C.' },
      riseOverReferenceK: nullable('number'), riseOverAmbientK: nullable('number'),
      loadScaledRiseK: { type: ['number', 'null'], description: 'Rise scaled to rated load, K.' },
      band: { type: ['integer', 'null'], description: 'Band the engine computed.' },
      effectiveBand: { type: ['integer', 'null'], description: 'Band in force: a manager\'s reviewed band, else the computed one.' },
      bandBasis: nullable('string'), action: { type: 'string' }, repairDeadlineDays: nullable('integer'),
      uncertaintyLowC: nullable('number'), uncertaintyHighC: nullable('number'),
      warnings: { type: 'array', items: { type: 'object', properties: { code: { type: 'string' }, severity: { type: 'string' }, message: { type: 'string' } } } },
      criteriaId: { type: 'string' }, criteriaVersion: { type: 'integer' }, closedAt: { type: ['string', 'null'], format: 'date-time' }, version: { type: 'integer' },
    },
  },
  Check: {
    type: 'object',
    description: 'The outcome of looking at one asset in one survey.',
    properties: {
      id: { type: 'string', format: 'uuid' }, surveyId: { type: 'string', format: 'uuid' }, plannedFor: { type: 'string', format: 'date' },
      siteId: { type: 'string', format: 'uuid' }, siteCode: { type: 'string' }, siteName: { type: 'string' },
      assetId: { type: 'string', format: 'uuid' }, assetLabel: { type: 'string' },
      outcome: { type: 'string', enum: ['clear', 'finding', 'not_reached'] },
      reason: { type: ['string', 'null'], enum: ['no_access', 'de_energised', 'outage', 'unsafe', 'other', null] },
      note: { type: 'string' }, checkedBy: nullable('string'), checkedAt: { type: 'string', format: 'date-time' }, findingCount: { type: 'integer' },
    },
  },
  WorkOrder: {
    type: 'object',
    description: 'A work order (the detail answer adds its findings, timeline and verifications).',
    required: ['id', 'reference', 'state', 'version'],
    additionalProperties: true,
    properties: {
      id: { type: 'string', format: 'uuid' }, number: { type: 'integer' }, reference: { type: 'string', examples: ['WO-12'] }, title: { type: 'string' },
      state: { type: 'string', enum: [...WORK_ORDER_STATES] }, band: nullable('integer'), dueOn: { type: ['string', 'null'], format: 'date' },
      overdue: { type: 'boolean' }, deferredUntil: { type: ['string', 'null'], format: 'date' }, stateReason: { type: 'string' },
      site: { type: 'object', properties: { id: { type: 'string', format: 'uuid' }, code: { type: 'string' }, name: { type: 'string' } } },
      assignees: { type: 'array', items: { type: 'object', properties: { id: { type: 'string' }, name: { type: 'string' } } } },
      findingCount: { type: 'integer' }, createdAt: { type: 'string', format: 'date-time' }, updatedAt: { type: 'string', format: 'date-time' },
      version: { type: 'integer', description: 'Send it back with a change (optimistic locking: 409 when someone changed it meanwhile).' },
    },
  },
  Trends: {
    type: 'object',
    description: 'Trend of each component of an asset: readings over time, band edges, least-squares line and the projected crossing of the next edge.',
    additionalProperties: true,
    properties: {
      assetId: { type: 'string', format: 'uuid' }, assetLabel: { type: 'string' },
      components: {
        type: 'array',
        items: {
          type: 'object', additionalProperties: true,
          properties: {
            component: { type: 'string' }, phase: { type: 'string' }, criteriaId: { type: 'string' },
            basis: { type: ['string', 'null'], enum: ['overReference', 'overAmbient', null] },
            quantity: { type: 'string', enum: ['loadScaled', 'measured'] },
            points: { type: 'array', items: { type: 'object', properties: { id: { type: 'string' }, date: { type: 'string', format: 'date' }, source: { type: 'string' }, valueK: { type: 'number' }, band: nullable('integer') } } },
            edges: { type: 'array', items: { type: 'object', properties: { value: { type: 'number' }, entersBand: { type: 'integer' }, label: { type: 'string' } } } },
            projection: {
              type: 'object',
              properties: {
                status: { type: 'string', enum: ['projected', 'too-few-points', 'not-rising', 'no-edge-above', 'no-fit'] },
                date: { type: ['string', 'null'], format: 'date' }, earliest: { type: ['string', 'null'], format: 'date' }, latest: { type: ['string', 'null'], format: 'date' },
                level: { type: 'number' }, t: nullable('number'), df: nullable('integer'),
              },
            },
          },
        },
      },
    },
  },
}

const errorResponse = (description: string) => ({ description, content: { 'application/json': { schema: ref('Error') } } })

/** The OpenAPI 3.1 document; `serverUrl` is the app's own origin. */
export function openApiDocument(serverUrl = '/'): Json {
  return {
    openapi: '3.1.0',
    info: {
      title: 'Greybody API',
      version: '1.0.0',
      description:
        'Read findings, checks, trends and work orders of one organisation, and move work orders between states, from a maintenance-management system. ' +
        'Authenticate every request with an organisation API token: `Authorization: Bearer gbt_…` (created by an owner under Settings → API tokens; shown once). ' +
        'A token acts for its own organisation only; other organisations answer 404. Scopes: `read` (what a viewer can read) and `read_write` ' +
        '(also moving work orders between states). No token can manage members, billing, settings or tokens. ' +
        `Each token may make ${TOKEN_RATE_PER_MINUTE} requests a minute; beyond that the answer is 429 with a Retry-After header (seconds). ` +
        'Every request made with a token is logged (token, method, path, status, time) and visible to owners. Temperatures are °C, rises K, lengths m.',
    },
    servers: [{ url: serverUrl }],
    security: [{ bearerToken: [] }],
    components: {
      securitySchemes: { bearerToken: { type: 'http', scheme: 'bearer', description: 'An organisation API token, `gbt_` followed by 43 characters.' } },
      schemas,
      responses: {
        E400: errorResponse('The request did not pass validation; `data.fieldErrors` names each field.'),
        E401: errorResponse('No token, an unknown token, or a revoked one.'),
        E403: errorResponse('The token\'s scope does not allow this.'),
        E404: errorResponse('Not found in this organisation (also any other organisation\'s path).'),
        E409: errorResponse('The work order changed meanwhile (send the current version) or cannot move that way.'),
        E429: { ...errorResponse(`More than ${TOKEN_RATE_PER_MINUTE} requests in this minute.`), headers: { 'Retry-After': { schema: { type: 'integer' }, description: 'Seconds until the next minute starts.' } } },
      },
    },
    paths: {
      '/api/orgs/{org}/findings': {
        get: {
          operationId: 'listFindings', summary: 'List findings', tags: ['Findings'],
          description: 'Newest survey first, then by band (most severe first).',
          parameters: [orgParam, ...queryParameters(findingListQuerySchema, { band: 'Band in force, 1 (most severe) to 4.', surveyId: 'Only this survey.' })],
          responses: { 200: json(page('Finding'), 'A page of findings.'), ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/findings/{id}': {
        get: {
          operationId: 'getFinding', summary: 'Read one finding', tags: ['Findings'],
          parameters: [orgParam, idParam('finding')],
          responses: { 200: json(ref('Finding'), 'The finding.'), ...errors(401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/findings/export': {
        get: {
          operationId: 'exportFindings', summary: 'Findings as CSV', tags: ['Findings'],
          description: 'Filtered like the list (page and pageSize are ignored: every matching row, in list order).',
          parameters: [orgParam, ...queryParameters(findingListQuerySchema).filter((p) => p.name !== 'page' && p.name !== 'pageSize')],
          responses: { 200: { description: csvDescription(FINDING_CSV_COLUMNS), content: { 'text/csv': { schema: { type: 'string' } } } }, ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/checks': {
        get: {
          operationId: 'listChecks', summary: 'List checks', tags: ['Checks'],
          description: 'Newest survey first, then site code and asset label. `from`/`to` bound the survey date.',
          parameters: [orgParam, ...queryParameters(checkListQuerySchema)],
          responses: { 200: json(page('Check'), 'A page of checks.'), ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/checks/export': {
        get: {
          operationId: 'exportChecks', summary: 'Checks as CSV', tags: ['Checks'],
          parameters: [orgParam, ...queryParameters(checkListQuerySchema).filter((p) => p.name !== 'page' && p.name !== 'pageSize')],
          responses: { 200: { description: csvDescription(CHECK_CSV_COLUMNS), content: { 'text/csv': { schema: { type: 'string' } } } }, ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/assets/{id}/trends': {
        get: {
          operationId: 'assetTrends', summary: 'Trends of an asset\'s components', tags: ['Trends'],
          parameters: [orgParam, idParam('asset'), ...queryParameters(trendQuerySchema, { component: 'Only this component (as named in its findings).', phase: 'With `component`: only this phase.' })],
          responses: { 200: json(ref('Trends'), 'One trend per component and phase.'), ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/work-orders': {
        get: {
          operationId: 'listWorkOrders', summary: 'List work orders', tags: ['Work orders'],
          parameters: [orgParam, ...queryParameters(workOrderListQuerySchema, { state: 'One state, or `active` for everything not closed or cancelled.' })],
          responses: { 200: json(page('WorkOrder'), 'A page of work orders.'), ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/work-orders/export': {
        get: {
          operationId: 'exportWorkOrders', summary: 'Work orders as CSV', tags: ['Work orders'],
          description: 'Filtered and sorted like the list (page and pageSize are ignored).',
          parameters: [orgParam, ...queryParameters(workOrderListQuerySchema).filter((p) => p.name !== 'page' && p.name !== 'pageSize')],
          responses: { 200: { description: csvDescription(WORK_ORDER_CSV_COLUMNS), content: { 'text/csv': { schema: { type: 'string' } } } }, ...errors(400, 401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/work-orders/{id}': {
        get: {
          operationId: 'getWorkOrder', summary: 'Read one work order', tags: ['Work orders'],
          parameters: [orgParam, idParam('work order')],
          responses: { 200: json(ref('WorkOrder'), 'The work order with its findings and timeline.'), ...errors(401, 403, 404, 429) },
        },
      },
      '/api/orgs/{org}/work-orders/{id}/move': {
        post: {
          operationId: 'moveWorkOrder', summary: 'Move a work order to another state', tags: ['Work orders'],
          description: 'Needs a `read_write` token. Allowed moves: open ⇄ planned, open/planned → in_repair, in_repair → planned or awaiting_verification, deferred → open/planned/in_repair. Closing happens only through a passed verification re-scan.',
          parameters: [orgParam, idParam('work order')],
          requestBody: { required: true, content: { 'application/json': { schema: jsonSchemaOf(workOrderMoveSchema) } } },
          responses: { 200: json(ref('WorkOrder'), 'The work order after the move.'), ...errors(400, 401, 403, 404, 409, 429) },
        },
      },
    },
  }
}

/** A curl example for an operation, as the docs page shows it. */
export function curlExample(method: string, path: string, body?: unknown, origin = 'https://greybody.example'): string {
  const url = `${origin}${path}`
  const lines = [`curl -sS${method === 'GET' ? '' : ` -X ${method}`} '${url}'`, `  -H "Authorization: Bearer $GREYBODY_TOKEN"`]
  if (body !== undefined) lines.push(`  -H 'Content-Type: application/json'`, `  -d '${JSON.stringify(body)}'`)
  return lines.join(' \\\n')
}
