// Marks the document once the first page has hydrated (<html data-hydrated>), so that whatever drives the page —
// browser tests, accessibility tools — can wait until controls answer instead of clicking server-rendered markup
// that Vue has not taken over yet (a form submitted then would go to the browser's default action).
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('app:suspense:resolve', () => {
    document.documentElement.dataset.hydrated = 'true'
  })
})
