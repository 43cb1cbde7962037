// Pages that need a signed-in person. Global auth middleware is off, so each such page names this one.
export default defineNuxtRouteMiddleware(async (to) => {
  const nuxtApp = useNuxtApp()
  const { status, getSession } = useAuth()
  // On the very first client render the session may still be loading; ask once rather than bounce a signed-in person.
  if (status.value === 'loading') await getSession()
  if (status.value !== 'authenticated') {
    return nuxtApp.runWithContext(() => navigateTo({ path: '/sign-in', query: { callbackUrl: to.fullPath } }))
  }
})
