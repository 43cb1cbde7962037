import { defineStore } from 'pinia'
import type { LengthUnit, Profile, TemperatureUnit } from '#shared/types/api'

// The signed-in person's display preferences, shared by every screen that shows a temperature, a length
// or a time. Values are stored in °C and metres; only the display follows these.
export const usePreferencesStore = defineStore('preferences', {
  state: () => ({
    temperatureUnit: 'C' as TemperatureUnit,
    lengthUnit: 'm' as LengthUnit,
    timeZone: 'UTC',
    loaded: false,
  }),
  actions: {
    apply(p: Pick<Profile, 'temperatureUnit' | 'lengthUnit' | 'timeZone'>) {
      this.temperatureUnit = p.temperatureUnit
      this.lengthUnit = p.lengthUnit
      this.timeZone = p.timeZone
      this.loaded = true
    },
    /** Reads the preferences from the signed-in person's profile (GET /api/account/me). */
    async load() {
      const fetcher = import.meta.server ? useRequestFetch() : $fetch
      const profile = await fetcher<Profile>('/api/account/me')
      this.apply(profile)
      return profile
    },
  },
})
