import { describe, expect, it } from 'vitest'
import { registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, readBody } from 'h3'
import { signUpSchema } from '#shared/schemas/account'

registerEndpoint('/api/auth/session', () => ({}))
registerEndpoint('/api/test/sign-up', {
  method: 'POST',
  handler: async (event) => {
    const body = await readBody(event)
    if (body.email === 'taken@example.org') {
      throw createError({
        statusCode: 409,
        statusMessage: 'Invalid input',
        data: { message: 'An account with taken@example.org already exists.', fieldErrors: { email: ['An account with taken@example.org already exists.'] } },
      })
    }
    return { organisation: { slug: 'new-org' } }
  },
})
registerEndpoint('/api/orgs/gone/members', () => {
  throw createError({ statusCode: 403, statusMessage: 'No longer a member', data: { message: 'You are no longer a member of Gone Ltd.' } })
})

const valid = { name: 'Ada Field', email: 'ada@example.org', password: 'a-long-enough-password', organisationName: 'Field Co' }

describe('useApiForm', () => {
  it('validates with the shared schema before sending anything', () => {
    const form = useApiForm()
    expect(form.validate(signUpSchema, { ...valid, email: 'not-an-address', password: 'short' })).toBeNull()
    expect(form.errorOf('email')).toMatch(/valid e-mail/)
    expect(form.errorOf('password')).toMatch(/10 characters/)
    expect(form.errorOf('name')).toBeUndefined()
  })

  it('returns the parsed values when they pass and clears earlier errors', () => {
    const form = useApiForm()
    form.validate(signUpSchema, { ...valid, name: '' })
    const parsed = form.validate(signUpSchema, { ...valid, email: '  Ada@Example.ORG ' })
    expect(parsed?.email).toBe('ada@example.org')
    expect(form.fieldErrors.value).toEqual({})
  })

  it('puts the server’s field errors beside the fields', async () => {
    const form = useApiForm()
    const result = await form.submit('/api/test/sign-up', { method: 'POST', body: { ...valid, email: 'taken@example.org' } })
    expect(result.ok).toBe(false)
    expect(form.statusCode.value).toBe(409)
    expect(form.message.value).toBe('An account with taken@example.org already exists.')
    expect(form.errorOf('email')).toBe('An account with taken@example.org already exists.')
    expect(form.pending.value).toBe(false)
  })

  it('hands back the data on success', async () => {
    const form = useApiForm()
    const result = await form.submit<{ organisation: { slug: string } }>('/api/test/sign-up', { method: 'POST', body: valid })
    expect(result).toEqual({ ok: true, data: { organisation: { slug: 'new-org' } } })
    expect(form.message.value).toBe('')
  })

  it('reports a 403 from an organisation route to the org layout', async () => {
    const access = useOrgAccess()
    access.clear()
    const form = useApiForm()
    await form.submit('/api/orgs/gone/members')
    expect(access.message.value).toBe('You are no longer a member of Gone Ltd.')
    access.clear()
  })
})

describe('safeCallbackUrl', () => {
  it('keeps paths inside the app and refuses addresses elsewhere', () => {
    expect(safeCallbackUrl('/orgs/lowmoor/members?tab=1')).toBe('/orgs/lowmoor/members?tab=1')
    expect(safeCallbackUrl('https://elsewhere.example/')).toBe('/')
    expect(safeCallbackUrl('//elsewhere.example/')).toBe('/')
    expect(safeCallbackUrl('/\\elsewhere.example')).toBe('/')
    expect(safeCallbackUrl(undefined, '/orgs')).toBe('/orgs')
    expect(safeCallbackUrl(['/first', '/second'])).toBe('/first')
  })
})
