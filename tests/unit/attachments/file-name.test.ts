import { describe, expect, it } from 'vitest'
import { MAX_ATTACHMENT_BYTES, MAX_FILE_NAME_CHARS, attachmentBeginSchema, formatBytes, sanitiseFileName } from '../../../shared/schemas/attachment'

describe('sanitiseFileName', () => {
  it.each([
    ['IR_0001.jpg', 'IR_0001.jpg'],
    ['../../etc/passwd.jpg', 'passwd.jpg'],
    ['C:\\Users\\theo\\Pictures\\IR_0002.png', 'IR_0002.png'],
    ['folder/', 'folder'],
    ['IR\u0000_0003.png', 'IR_0003.png'],
    ['tab\there\r\n.png', 'tabhere.png'],
    // A right-to-left override would make "gnp.exe" display as "exe.png".
    ['photo\u202egnp.exe', 'photognp.exe'],
    ['.hidden.png', 'hidden.png'],
    ['..', 'image'],
    ['', 'image'],
    ['  spaced   out  name .jpg ', 'spaced out name .jpg'],
    ['what?*<>|:.png', 'what______.png'],
  ])('%j → %j', (raw, want) => {
    expect(sanitiseFileName(raw)).toBe(want)
  })

  it('keeps long names to the limit with their extension', () => {
    const out = sanitiseFileName(`${'a'.repeat(500)}.jpeg`)
    expect(out).toHaveLength(MAX_FILE_NAME_CHARS)
    expect(out.endsWith('.jpeg')).toBe(true)
  })
})

describe('attachmentBeginSchema', () => {
  const ok = { kind: 'infrared', fileName: 'a.png', contentType: 'image/png', sizeBytes: 10 }
  it('accepts JPEG and PNG up to 25 MB and refuses the rest at their fields', () => {
    expect(attachmentBeginSchema.safeParse(ok).success).toBe(true)
    expect(attachmentBeginSchema.safeParse({ ...ok, sizeBytes: MAX_ATTACHMENT_BYTES }).success).toBe(true)
    const big = attachmentBeginSchema.safeParse({ ...ok, sizeBytes: MAX_ATTACHMENT_BYTES + 1 })
    expect(big.error?.issues[0]?.path).toEqual(['sizeBytes'])
    expect(attachmentBeginSchema.safeParse({ ...ok, sizeBytes: 0 }).error?.issues[0]?.message).toMatch(/empty/)
    expect(attachmentBeginSchema.safeParse({ ...ok, contentType: 'image/heic' }).error?.issues[0]?.message).toMatch(/Only JPEG or PNG/)
    expect(attachmentBeginSchema.safeParse({ ...ok, kind: 'sketch' }).success).toBe(false)
  })

  it('formats sizes 1024-based like the limit', () => {
    expect(formatBytes(512)).toBe('512 bytes')
    expect(formatBytes(2048)).toBe('2 kB')
    expect(formatBytes(MAX_ATTACHMENT_BYTES)).toBe('25.0 MB')
  })
})
