import { defineStore } from 'pinia'
import type { Role } from '#shared/permissions'
import type { MyOrganisation } from '#shared/types/api'

// The URL is the source of truth for the current organisation; this store mirrors it for the shell
// (switcher, navigation) so that components need not each read the route and the API.
export const useOrganisationStore = defineStore('organisation', {
  state: () => ({
    slug: null as string | null,
    role: null as Role | null,
    organisations: [] as MyOrganisation[],
  }),
  getters: {
    current: (state): MyOrganisation | null => state.organisations.find((o) => o.slug === state.slug) ?? null,
    others: (state): MyOrganisation[] => state.organisations.filter((o) => o.slug !== state.slug),
  },
  actions: {
    setCurrent(slug: string | null, role: Role | null = null) {
      this.slug = slug
      this.role = role ?? this.organisations.find((o) => o.slug === slug)?.role ?? null
    },
    setOrganisations(list: MyOrganisation[]) {
      this.organisations = list
      if (this.slug && !this.role) this.role = list.find((o) => o.slug === this.slug)?.role ?? null
    },
  },
})
