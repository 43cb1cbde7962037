import { describe, expect, it } from 'vitest'
import { storageOrigins, tileOrigin } from '../../../server/utils/security-origins'

// The origins the content security policy adds from the deployment's configuration (server/plugins/security-policy.ts).
describe('object-storage origins for img-src and connect-src', () => {
  it('is the configured endpoint’s origin, path and credentials dropped', () => {
    expect(storageOrigins('http://127.0.0.1:54330', 'greybody', 'us-east-1')).toEqual(['http://127.0.0.1:54330'])
    expect(storageOrigins('https://storage.example.net/some/prefix', 'greybody', 'eu-west-2')).toEqual(['https://storage.example.net'])
  })
  it('is AWS S3’s virtual-hosted and path-style hosts when no endpoint is set (AWS S3 documentation, virtual hosting)', () => {
    expect(storageOrigins('', 'greybody-prod', 'eu-west-2')).toEqual(['https://greybody-prod.s3.eu-west-2.amazonaws.com', 'https://s3.eu-west-2.amazonaws.com'])
  })
  it('adds nothing for an endpoint that is not a URL', () => {
    expect(storageOrigins('not a url', 'greybody', 'us-east-1')).toEqual([])
  })
})

describe('map tile origin for img-src', () => {
  it('turns a {s} subdomain placeholder into a wildcard and keeps the port', () => {
    expect(tileOrigin('https://{s}.tiles.example.org/{z}/{x}/{y}.png')).toBe('https://*.tiles.example.org')
    expect(tileOrigin('http://127.0.0.1:8080/{z}/{x}/{y}.png')).toBe('http://127.0.0.1:8080')
  })
  it('refuses what a CSP source cannot express', () => {
    expect(tileOrigin('tiles.example.org/{z}/{x}/{y}.png')).toBeNull()
    expect(tileOrigin('https://tiles.{s}.example.org/{z}/{x}/{y}.png')).toBeNull()
    expect(tileOrigin("https://evil.example'; script-src *")).toBeNull()
  })
})
