import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { HeadObjectCommand, S3Client } from '@aws-sdk/client-s3'
import { createError } from 'h3'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { serviceUnavailableError, unavailableService } from '../../../server/utils/unavailable'

// Which failures are answered 503 "unavailable" (server/plugins/unavailable.ts) rather than a bare 500: real errors
// from node-postgres, the AWS SDK and fetch against ports on loopback, plus PostgreSQL errors by SQLSTATE
// (PostgreSQL manual, appendix A "Error codes").

let closedPort: number
let busy: Server
let busyPort: number

beforeAll(async () => {
  const probe = createServer()
  await new Promise<void>((r) => probe.listen(0, '127.0.0.1', () => r()))
  closedPort = (probe.address() as AddressInfo).port
  await new Promise<void>((r) => probe.close(() => r()))
  // An object store that answers 503 to everything, as S3 does when it sheds load.
  busy = createServer((_req, res) => { res.statusCode = 503; res.end() })
  await new Promise<void>((r) => busy.listen(0, '127.0.0.1', () => r()))
  busyPort = (busy.address() as AddressInfo).port
})
afterAll(() => new Promise<void>((r) => busy.close(() => r())))

async function caught(fn: () => Promise<unknown>): Promise<unknown> {
  try {
    await fn()
  } catch (e) {
    return e
  }
  throw new Error('expected a failure')
}

function s3At(port: number) {
  return new S3Client({
    region: 'us-east-1', endpoint: `http://127.0.0.1:${port}`, forcePathStyle: true, maxAttempts: 1,
    credentials: { accessKeyId: 'k', secretAccessKey: 's' },
  })
}

function pgError(code: string) {
  const e = new pg.DatabaseError('from the server', 0, 'error')
  e.code = code
  return e
}

describe('unavailableService', () => {
  it('takes a refused PostgreSQL connection for the database, also when h3 has wrapped it', async () => {
    const client = new pg.Client({ host: '127.0.0.1', port: closedPort, user: 'x', database: 'x' })
    const err = await caught(() => client.connect())
    expect((err as { code: string }).code).toBe('ECONNREFUSED')
    expect(unavailableService(err)).toBe('database')
    expect(unavailableService(createError(err as Error))).toBe('database')
  })

  it('takes shutdown, start-up and connection SQLSTATEs and dropped connections for the database', () => {
    for (const code of ['57P01', '57P02', '57P03', '08006', '08001', '53300']) expect(unavailableService(pgError(code)), code).toBe('database')
    expect(unavailableService(new Error('Connection terminated unexpectedly'))).toBe('database')
    expect(unavailableService(new Error('Client has encountered a connection error and is not queryable'))).toBe('database')
  })

  it('leaves ordinary database errors alone', () => {
    for (const code of ['23505', '23503', '42501', '40001', '22P02']) expect(unavailableService(pgError(code)), code).toBeNull()
    expect(unavailableService(createError({ statusCode: 409, statusMessage: 'Changed meanwhile' }))).toBeNull()
    expect(unavailableService(new Error('something else'))).toBeNull()
    expect(unavailableService(null)).toBeNull()
  })

  it('takes an unreachable or 5xx object store for storage, but not a missing object', async () => {
    const refused = await caught(() => s3At(closedPort).send(new HeadObjectCommand({ Bucket: 'b', Key: 'k' })))
    expect(unavailableService(refused)).toBe('storage')
    expect(unavailableService(createError(refused as Error))).toBe('storage')
    const shedding = await caught(() => s3At(busyPort).send(new HeadObjectCommand({ Bucket: 'b', Key: 'k' })))
    expect((shedding as { $metadata: { httpStatusCode: number } }).$metadata.httpStatusCode).toBe(503)
    expect(unavailableService(shedding)).toBe('storage')
    const missing = Object.assign(new Error('NotFound'), { name: 'NotFound', $metadata: { httpStatusCode: 404 } })
    expect(unavailableService(missing)).toBeNull()
  })

  it('does not take another service refused behind fetch for the database', async () => {
    const err = await caught(() => fetch(`http://127.0.0.1:${closedPort}/`))
    expect(((err as Error).cause as { code: string }).code).toBe('ECONNREFUSED')
    expect(unavailableService(err)).toBeNull()
  })
})

describe('serviceUnavailableError', () => {
  it('is a 503 with a plain message for people and the seconds to wait', () => {
    const db = serviceUnavailableError('database')
    expect(db.statusCode).toBe(503)
    expect(db.data).toMatchObject({ message: 'The database is unavailable just now. Try again in a moment.', service: 'database', retryAfterSeconds: 5 })
    expect(serviceUnavailableError('storage').data.message).toMatch(/^File storage is unavailable/)
  })
})
