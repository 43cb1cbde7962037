// Development only: the e-mails the app sent, read from the local SMTP catcher. Absent in production.
export default defineEventHandler(async () => {
  const config = useRuntimeConfig()
  // Off unless NUXT_DEV_MAILBOX=1 and a catcher is configured; production configuration sets neither.
  if (config.devMailbox !== '1' || !config.mailCatcherUrl) {
    throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'The development mailbox is switched off.' } })
  }
  const messages = await $fetch<Array<Record<string, unknown>>>('/messages', { baseURL: config.mailCatcherUrl })
  return messages
})
