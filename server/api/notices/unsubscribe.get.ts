// What a one-click link from a notice e-mail names (organisation, kind, current choice). No sign-in: the signed
// token is the authority, and it names only one person's e-mail choice for one kind of notice.
import { noticeTokenQuerySchema } from '#shared/schemas/notices'
import { tokenInfo } from '~~/server/services/notices'

export default defineEventHandler(async (event) => {
  const { token } = queryOf(event, noticeTokenQuerySchema)
  const { token: _t, ...info } = await tokenInfo(token)
  setResponseHeader(event, 'cache-control', 'no-store')
  return info
})
