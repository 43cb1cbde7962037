// Development only: the e-mails the app sent, read from the local SMTP catcher. Absent in production.
export default defineEventHandler(async () => {
  const config = useRuntimeConfig()
  // Off unless NUXT_DEV_MAILBOX=1 (Nuxt parses it to the number 1, hence String()) and a catcher is configured; production configuration sets neither.
  if (String(config.devMailbox) !== '1' || !config.mailCatcherUrl) {
    throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'The development mailbox is switched off.' } })
  }
  const messages = await $fetch<Array<Record<string, unknown>>>('/messages', { baseURL: config.mailCatcherUrl })
  return messages
})
