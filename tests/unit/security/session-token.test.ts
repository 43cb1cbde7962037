import { decode, encode } from 'next-auth/jwt'
import { describe, expect, it, vi } from 'vitest'
import { decodeSessionToken, encodeSessionToken } from '../../../server/utils/session-token'

// The app's session-token encode/decode (server/utils/session-token.ts) must stay next-auth's own format, checked
// against next-auth's encode/decode themselves (next-auth 4, next-auth/jwt): a token either side made, the other reads.
const secret = 'a test secret that is long enough for HKDF'

describe('session tokens in next-auth’s format', () => {
  it('reads a token next-auth made, and next-auth reads one made here', async () => {
    const theirs = await encode({ token: { sub: 'user-1', authAt: 1_700_000_000_000 }, secret, maxAge: 3600 })
    expect(await decodeSessionToken({ token: theirs, secret })).toMatchObject({ sub: 'user-1', authAt: 1_700_000_000_000 })
    const ours = await encodeSessionToken({ token: { sub: 'user-2', authAt: 42 }, secret, maxAge: 3600 })
    const read = await decode({ token: ours, secret })
    expect(read).toMatchObject({ sub: 'user-2', authAt: 42 })
    // Same claims next-auth sets: issued at, expiry maxAge later, a token id.
    expect(read!.exp! - (read!.iat as number)).toBe(3600)
    expect(typeof read!.jti).toBe('string')
  })

  it('refuses a token made with another secret, and a tampered one', async () => {
    const token = await encodeSessionToken({ token: { sub: 'user-3' }, secret, maxAge: 3600 })
    await expect(decodeSessionToken({ token, secret: 'some other secret entirely' })).rejects.toThrow()
    const parts = token.split('.')
    parts[3] = parts[3]!.slice(0, -2) + (parts[3]!.endsWith('AA') ? 'BB' : 'AA')
    await expect(decodeSessionToken({ token: parts.join('.'), secret })).rejects.toThrow()
  })

  it('refuses an expired token, also after having read it while it was valid', async () => {
    // Expired 20 s ago: past jose's 15 s clock tolerance, which next-auth's decode also allows.
    const expired = await encode({ token: { sub: 'user-4' }, secret, maxAge: -20 })
    await expect(decodeSessionToken({ token: expired, secret })).rejects.toThrow()
    const shortLived = await encodeSessionToken({ token: { sub: 'user-5' }, secret, maxAge: 1 })
    expect(await decodeSessionToken({ token: shortLived, secret })).toMatchObject({ sub: 'user-5' })
    vi.useFakeTimers({ toFake: ['Date'] })
    try {
      vi.setSystemTime(Date.now() + 17_000)
      // Remembered, but its expiry is checked again: refused now (decrypting it again refuses it too).
      await expect(decodeSessionToken({ token: shortLived, secret })).rejects.toThrow()
    } finally {
      vi.useRealTimers()
    }
  })

  it('answers null without a token', async () => {
    expect(await decodeSessionToken({ token: undefined, secret })).toBeNull()
    expect(await decodeSessionToken({ token: '', secret })).toBeNull()
  })
})
