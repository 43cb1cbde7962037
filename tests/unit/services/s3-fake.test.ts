import { createHash, randomBytes } from 'node:crypto'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { Readable } from 'node:stream'
import { GetObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startS3Fake } from '../../../scripts/fakes/s3.mjs'

describe('S3 fake (s3rver)', () => {
  let dir: string
  let fake: Awaited<ReturnType<typeof startS3Fake>>
  let s3: S3Client

  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'greybody-s3-'))
    fake = await startS3Fake({ port: 0, directory: dir })
    s3 = new S3Client({
      endpoint: fake.endpoint,
      region: fake.region,
      forcePathStyle: true,
      credentials: { accessKeyId: fake.accessKeyId, secretAccessKey: fake.secretAccessKey },
      // Without these a streamed PutObject to s3rver stores the SDK's chunk framing inside the object.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    })
  })
  afterAll(async () => {
    s3?.destroy()
    await fake?.close()
    fs.rmSync(dir, { recursive: true, force: true })
  })

  const download = async (key: string) => {
    const out = await s3.send(new GetObjectCommand({ Bucket: fake.bucket, Key: key }))
    return Buffer.from(await out.Body!.transformToByteArray())
  }
  const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex')

  it('round-trips a binary object byte for byte', async () => {
    const body = randomBytes(1_500_000)
    await s3.send(new PutObjectCommand({ Bucket: fake.bucket, Key: 'orgs/1/images/ir-0001.bin', Body: body, ContentType: 'application/octet-stream' }))
    const back = await download('orgs/1/images/ir-0001.bin')
    expect(back.length).toBe(body.length)
    expect(sha(back)).toBe(sha(body))
  })

  it('round-trips a streamed upload byte for byte', async () => {
    const body = randomBytes(300_000)
    const stream = Readable.from([body.subarray(0, 100_000), body.subarray(100_000)])
    await s3.send(new PutObjectCommand({ Bucket: fake.bucket, Key: 'orgs/1/grids/g.csv', Body: stream, ContentLength: body.length }))
    expect(sha(await download('orgs/1/grids/g.csv'))).toBe(sha(body))
  })

  it('allows browser uploads from loopback origins only', async () => {
    const preflight = (origin: string) =>
      fetch(`${fake.endpoint}/${fake.bucket}/orgs/1/x.jpg`, {
        method: 'OPTIONS',
        headers: { origin, 'access-control-request-method': 'PUT', 'access-control-request-headers': 'content-type' },
      })
    const local = await preflight('http://127.0.0.1:3000')
    expect(local.status).toBe(200)
    expect(local.headers.get('access-control-allow-methods')).toContain('PUT')
    const foreign = await preflight('https://elsewhere.example')
    expect(foreign.status).toBe(403)
  })
})
