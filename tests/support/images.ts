import { readFileSync } from 'node:fs'
import { HeadObjectCommand, S3Client } from '@aws-sdk/client-s3'
import sharp from 'sharp'
import type { ApiClient, ApiResponse } from './api'
import { PROFILE, ROOT } from './env'

// Images for attachment tests, made on the spot with sharp (no binary fixtures in the repository).

/** A small PNG of a warm blob on a dark background (w × h px). */
export async function pngBytes(w = 64, h = 48): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#1c1917"/><circle cx="${w / 2}" cy="${h / 2}" r="${Math.min(w, h) / 3}" fill="#f59e0b"/></svg>`
  return sharp(Buffer.from(svg)).png().toBuffer()
}

/** A JPEG photo-sized image (w × h px). */
export async function jpegBytes(w = 1200, h = 900): Promise<Buffer> {
  return sharp({ create: { width: w, height: h, channels: 3, background: { r: 120, g: 130, b: 140 } } }).jpeg({ quality: 80 }).toBuffer()
}

/** begin → PUT the bytes to the presigned URL (as the browser does) → complete. Returns each step's answer. */
export async function uploadImage(
  client: ApiClient,
  base: string,
  bytes: Uint8Array,
  opts: { kind?: string; fileName?: string; contentType?: string; sizeBytes?: number } = {},
): Promise<{ begin: ApiResponse; put?: Response; complete?: ApiResponse }> {
  const begin = await client.post(base, {
    kind: opts.kind ?? 'infrared',
    fileName: opts.fileName ?? 'IR_0001.png',
    contentType: opts.contentType ?? 'image/png',
    sizeBytes: opts.sizeBytes ?? bytes.length,
  })
  if (begin.status !== 201) return { begin }
  const put = await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(bytes) })
  const complete = await client.post(`${base}/${begin.body.attachment.id}/complete`)
  return { begin, put, complete }
}

let s3: { client: S3Client; bucket: string } | undefined

/** The test profile's local S3, to look at objects behind the app's back. */
export function testS3(): { client: S3Client; bucket: string } {
  if (!s3) {
    const env: Record<string, string> = {}
    for (const line of readFileSync(`${ROOT}.data/${PROFILE}/services.env`, 'utf8').split('\n')) {
      const m = /^([A-Z0-9_]+)=(.*)$/.exec(line.trim())
      if (m) env[m[1]!] = m[2]!.replace(/^"(.*)"$|^'(.*)'$/, '$1$2')
    }
    s3 = {
      bucket: env.NUXT_S3_BUCKET || 'greybody',
      client: new S3Client({
        region: env.NUXT_S3_REGION || 'us-east-1',
        endpoint: env.NUXT_S3_ENDPOINT,
        forcePathStyle: true,
        credentials: { accessKeyId: env.NUXT_S3_ACCESS_KEY_ID!, secretAccessKey: env.NUXT_S3_SECRET_ACCESS_KEY! },
        requestChecksumCalculation: 'WHEN_REQUIRED',
        responseChecksumValidation: 'WHEN_REQUIRED',
      }),
    }
  }
  return s3
}

/** Whether an object exists in the local S3. */
export async function objectExists(key: string): Promise<boolean> {
  const { client, bucket } = testS3()
  try {
    await client.send(new HeadObjectCommand({ Bucket: bucket, Key: key }))
    return true
  } catch {
    return false
  }
}
