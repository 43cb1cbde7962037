import { describe, expect, it } from 'vitest'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import AppNav from '~/components/app/AppNav.vue'

registerEndpoint('/api/auth/session', () => ({}))

async function linksFor(role: 'owner' | 'manager' | 'thermographer' | 'crew' | 'viewer') {
  const wrapper = await mountSuspended(AppNav, { props: { org: 'lowmoor', role } })
  return wrapper.findAll('a').map((a) => ({ text: a.text(), href: a.attributes('href') }))
}

describe('AppNav', () => {
  it('shows an owner the organisation screens, each inside the organisation', async () => {
    const links = await linksFor('owner')
    const byText = Object.fromEntries(links.map((l) => [l.text, l.href]))
    expect(links[0]).toEqual({ text: 'Overview', href: '/orgs/lowmoor' })
    expect(byText.Workbench).toBe('/orgs/lowmoor/workbench')
    expect(byText.Members).toBe('/orgs/lowmoor/members')
    expect(byText.Settings).toBe('/orgs/lowmoor/settings')
    for (const link of links) expect(link.href).toMatch(/^\/orgs\/lowmoor(\/|$)/)
  })

  it('hides Members and Settings from a viewer but keeps the overview and workbench', async () => {
    const texts = (await linksFor('viewer')).map((l) => l.text)
    expect(texts).toContain('Overview')
    expect(texts).toContain('Workbench')
    expect(texts).not.toContain('Members')
    expect(texts).not.toContain('Settings')
  })

  it('lets a manager see Members but not Settings', async () => {
    const texts = (await linksFor('manager')).map((l) => l.text)
    expect(texts).toContain('Members')
    expect(texts).not.toContain('Settings')
  })

  it('shows nothing before the role is known', async () => {
    const wrapper = await mountSuspended(AppNav, { props: { org: 'lowmoor', role: null } })
    expect(wrapper.findAll('a')).toHaveLength(0)
  })
})
