import { mapSites } from '~~/server/services/programme'

// Every active site with its status, for the map (a picture, not a list: not paginated).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return mapSites(ctx)
})
