import { organisationCreateSchema } from '#shared/schemas/organisation'
import { createOrganisation } from '~~/server/services/organisations'

// Any signed-in person may start an organisation; they become its owner.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { name } = await bodyOf(event, organisationCreateSchema)
  const org = await useDb().transaction().execute((trx) => createOrganisation(trx, name, user.id))
  setResponseStatus(event, 201)
  return { slug: org.slug, name: org.name, role: 'owner' as const }
})
