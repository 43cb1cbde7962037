// Sign-in and sign-up are for people without a session; a signed-in person goes where they were heading.
export default defineNuxtRouteMiddleware(async (to) => {
  const nuxtApp = useNuxtApp()
  const { status, getSession } = useAuth()
  if (status.value === 'loading') await getSession()
  if (status.value === 'authenticated') return nuxtApp.runWithContext(() => navigateTo(safeCallbackUrl(to.query.callbackUrl)))
})
