import { findingVersionSchema } from '#shared/schemas/finding'
import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { findingSchema } from '#shared/schemas/survey'
import { assertFindingExists, editFinding } from '~~/server/services/findings'

// The assigned thermographer's correction of a saved finding: the whole finding again, with the version it was loaded at.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertFindingExists(ctx, id)
  const { version } = await bodyOf(event, findingVersionSchema)
  return editFinding(ctx, id, version, await bodyOf(event, findingSchema))
})
