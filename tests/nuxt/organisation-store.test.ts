import { beforeEach, describe, expect, it } from 'vitest'
import { registerEndpoint } from '@nuxt/test-utils/runtime'
import { createPinia, setActivePinia } from 'pinia'

registerEndpoint('/api/auth/session', () => ({}))

describe('organisation store', () => {
  beforeEach(() => setActivePinia(createPinia()))

  it('takes the role from the list of organisations when the summary has not said yet', () => {
    const store = useOrganisationStore()
    store.setOrganisations([
      { slug: 'lowmoor', name: 'Lowmoor Valley Power', role: 'owner' },
      { slug: 'harth', name: 'Harth Grid', role: 'viewer' },
    ])
    store.setCurrent('harth')
    expect(store.role).toBe('viewer')
    expect(store.current?.name).toBe('Harth Grid')
    expect(store.others.map((o) => o.slug)).toEqual(['lowmoor'])
  })

  it('prefers the role the server just confirmed', () => {
    const store = useOrganisationStore()
    store.setOrganisations([{ slug: 'lowmoor', name: 'Lowmoor Valley Power', role: 'owner' }])
    store.setCurrent('lowmoor', 'manager')
    expect(store.role).toBe('manager')
  })

  it('has no organisation and no role outside an organisation', () => {
    const store = useOrganisationStore()
    store.setOrganisations([{ slug: 'lowmoor', name: 'Lowmoor Valley Power', role: 'owner' }])
    store.setCurrent(null)
    expect(store.current).toBeNull()
    expect(store.role).toBeNull()
  })
})
