import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3'
import { getSignedUrl } from '@aws-sdk/s3-request-presigner'

let client: S3Client | null = null

/** One S3 client per process, configured from the runtime config (s3rver locally, the hosted service in production). */
export function useObjectStore(): { s3: S3Client; bucket: string } {
  const config = useRuntimeConfig()
  if (!client) {
    client = new S3Client({
      region: config.s3Region || 'us-east-1',
      ...(config.s3Endpoint ? { endpoint: config.s3Endpoint, forcePathStyle: true } : {}),
      ...(config.s3AccessKeyId ? { credentials: { accessKeyId: config.s3AccessKeyId, secretAccessKey: config.s3SecretAccessKey } } : {}),
      // Without these a streamed PutObject to s3rver keeps the SDK's chunk framing, and presigned PUTs carry an empty-body checksum.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    })
  }
  return { s3: client, bucket: config.s3Bucket || 'greybody' }
}

/**
 * The object key of a tenant's file. Every key starts with the organisation's id, so one tenant's prefix never
 * holds another's objects; the caller passes the org id it resolved with requireMember, never a client value.
 */
export function tenantKey(orgId: string, ...parts: string[]): string {
  return [`orgs/${orgId}`, ...parts.map((p) => p.replace(/[^A-Za-z0-9._-]/g, '_'))].join('/')
}

/** Stores bytes under a key. */
export async function putObject(key: string, body: Uint8Array | string, contentType: string): Promise<void> {
  const { s3, bucket } = useObjectStore()
  await s3.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: body, ContentType: contentType }))
}

/** Reads a whole object (or its first bytes with `range`, e.g. 'bytes=0-63'); null when it does not exist. */
export async function getObjectBytes(key: string, range?: string): Promise<Uint8Array | null> {
  const { s3, bucket } = useObjectStore()
  try {
    const res = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: key, ...(range ? { Range: range } : {}) }))
    return res.Body ? await res.Body.transformToByteArray() : new Uint8Array()
  } catch (e) {
    if (isMissing(e)) return null
    throw e
  }
}

/** Size and type of an object; null when it does not exist. */
export async function headObject(key: string): Promise<{ size: number; contentType: string | null } | null> {
  const { s3, bucket } = useObjectStore()
  try {
    const res = await s3.send(new HeadObjectCommand({ Bucket: bucket, Key: key }))
    return { size: Number(res.ContentLength ?? 0), contentType: res.ContentType ?? null }
  } catch (e) {
    if (isMissing(e)) return null
    throw e
  }
}

/** Removes an object (used for refused uploads; inspection records themselves are never deleted). */
export async function deleteObject(key: string): Promise<void> {
  const { s3, bucket } = useObjectStore()
  await s3.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }))
}

/** A short-lived URL the browser PUTs the file to directly (the app never streams the upload). */
export async function presignPut(key: string, contentType: string, expiresIn = 900): Promise<string> {
  const { s3, bucket } = useObjectStore()
  return getSignedUrl(s3, new PutObjectCommand({ Bucket: bucket, Key: key, ContentType: contentType }), { expiresIn })
}

/** A short-lived URL to read an object; `downloadName` makes the browser save it under that name. */
export async function presignGet(key: string, opts: { expiresIn?: number; downloadName?: string } = {}): Promise<string> {
  const { s3, bucket } = useObjectStore()
  const disposition = opts.downloadName ? `attachment; filename="${opts.downloadName.replace(/["\\\r\n]/g, '_')}"` : undefined
  return getSignedUrl(s3, new GetObjectCommand({ Bucket: bucket, Key: key, ResponseContentDisposition: disposition }), { expiresIn: opts.expiresIn ?? 300 })
}

function isMissing(e: unknown): boolean {
  const err = e as { name?: string; $metadata?: { httpStatusCode?: number } }
  return err?.name === 'NoSuchKey' || err?.name === 'NotFound' || err?.$metadata?.httpStatusCode === 404
}
