// Local S3 (s3rver) with the app's bucket and a CORS rule so the browser can PUT/GET presigned URLs
// from the app on any loopback port. Credentials are s3rver's fixed pair; nothing here is secret.
import fs from 'node:fs'
import http from 'node:http'
import S3rver from 's3rver'

export const S3_ACCESS_KEY_ID = 'S3RVER'
export const S3_SECRET_ACCESS_KEY = 'S3RVER'
export const S3_REGION = 'us-east-1'
export const S3_BUCKET = 'greybody'

// Origins are limited to loopback on purpose: the fake holds whatever developers upload.
const CORS_XML = `<?xml version="1.0" encoding="UTF-8"?>
<CORSConfiguration xmlns="http://s3.amazonaws.com/doc/2006-03-01/">
  <CORSRule>
    <AllowedOrigin>http://127.0.0.1:*</AllowedOrigin>
    <AllowedOrigin>http://localhost:*</AllowedOrigin>
    <AllowedOrigin>http://[::1]:*</AllowedOrigin>
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>POST</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`

/**
 * @typedef {{ port: number, endpoint: string, bucket: string, region: string, accessKeyId: string, secretAccessKey: string, close: () => Promise<void> }} S3Fake
 */

/**
 * Starts s3rver on 127.0.0.1 with the bucket (and its CORS rule) created; port 0 = any free port.
 * @param {{ port?: number, host?: string, directory: string, bucket?: string }} options
 * @returns {Promise<S3Fake>}
 */
export async function startS3Fake({ port = 0, host = '127.0.0.1', directory, bucket = S3_BUCKET }) {
  fs.mkdirSync(directory, { recursive: true })
  const s3rver = new S3rver({
    address: host,
    port,
    silent: true,
    directory,
    // Path-style only: virtual-host names would need DNS for <bucket>.127.0.0.1.
    vhostBuckets: false,
    configureBuckets: [{ name: bucket, configs: [CORS_XML] }],
  })
  await s3rver.configureBuckets()
  // s3rver.run() cannot report a busy port (it resolves only on success and leaves the 'error' event
  // unhandled), so the HTTP server is created here around its request handler.
  const server = http.createServer(s3rver.callback())
  server.on('close', () => {
    s3rver.logger.exceptions.unhandle()
    s3rver.logger.close()
  })
  await new Promise((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => {
      server.off('error', reject)
      resolve(undefined)
    })
  })
  const actual = /** @type {import('node:net').AddressInfo} */ (server.address()).port
  return {
    port: actual,
    endpoint: `http://${host}:${actual}`,
    bucket,
    region: S3_REGION,
    accessKeyId: S3_ACCESS_KEY_ID,
    secretAccessKey: S3_SECRET_ACCESS_KEY,
    close: async () => {
      server.closeAllConnections()
      await new Promise((resolve) => server.close(() => resolve(undefined)))
    },
  }
}
