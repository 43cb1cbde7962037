// Origins the content security policy must allow, worked out from the deployment's configuration
// (used by server/plugins/security-policy.ts).

/** The origin(s) presigned object-storage URLs point at: the configured endpoint, or AWS S3's own hosts. */
export function storageOrigins(endpoint: string, bucket: string, region: string): string[] {
  if (endpoint) {
    try {
      return [new URL(endpoint).origin]
    } catch {
      return []
    }
  }
  // The SDK uses the virtual-hosted form (bucket as subdomain) and, for some bucket names, the path form.
  return [`https://${bucket}.s3.${region}.amazonaws.com`, `https://s3.${region}.amazonaws.com`]
}

/** The origin of a tile URL template such as https://{s}.tile.example.org/{z}/{x}/{y}.png ({s} → *). */
export function tileOrigin(template: string): string | null {
  const m = /^(https?):\/\/([^/?#]+)/i.exec(template.trim())
  if (!m) return null
  const host = m[2]!.replace(/\{[a-z]+\}/gi, '*')
  return /^(\*\.)?[A-Za-z0-9.-]+(:\d+)?$/.test(host) ? `${m[1]!.toLowerCase()}://${host}` : null
}
