import { ATTACHMENT_KINDS, type AttachmentKind } from '#shared/schemas/attachment'
import type { AttachmentCheck, AttachmentSubject, AttachmentWriteOptions } from './attachments'

// The finding's side of attachments: which finding, who may add images to it and when. The rules mirror
// recording on a survey (server/services/surveys.ts): only the survey's assigned thermographer, and only while the
// survey is in progress or returned; everyone with surveys.view may look.

/** Images a finding takes: the thermogram and a visible-light photo of the same spot. */
export const FINDING_ATTACHMENT_KINDS: readonly AttachmentKind[] = ATTACHMENT_KINDS.filter((k) => k !== 'repair')

async function findingSurvey(ctx: MemberContext, findingId: string) {
  const row = await useDb().selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .select(['f.id', 's.id as survey_id', 's.state', 's.thermographer_id'])
    .where('f.organisation_id', '=', ctx.org.id)
    .where('f.id', '=', findingId)
    .where('s.archived_at', 'is', null)
    .executeTakeFirst()
  if (!row) throw notFound('Finding')
  return row
}

/** 404 unless the finding is this organisation's (on a survey that is not archived). Run before reading a body. */
export async function assertFindingExists(ctx: MemberContext, findingId: string): Promise<void> {
  await findingSurvey(ctx, findingId)
}

export function findingSubject(findingId: string): AttachmentSubject {
  return { kind: 'finding', id: findingId }
}

/** Reading a finding's images: the finding must be this organisation's. */
export function findingReadCheck(ctx: MemberContext, findingId: string): AttachmentCheck {
  return () => assertFindingExists(ctx, findingId)
}

/** Adding images to a finding: the survey's assigned thermographer, while the survey is being recorded. */
export function findingWriteOptions(ctx: MemberContext, findingId: string): AttachmentWriteOptions {
  return {
    kinds: FINDING_ATTACHMENT_KINDS,
    check: async () => {
      const s = await findingSurvey(ctx, findingId)
      // Recording is personal: the images are part of the assigned thermographer's record of the survey.
      if (s.thermographer_id !== ctx.user.id) {
        throw createError({
          statusCode: 403,
          statusMessage: 'Not your survey',
          data: { message: 'Only the thermographer assigned to this survey can add images to its findings.' },
        })
      }
      if (s.state !== 'in_progress' && s.state !== 'returned') {
        const why = s.state === 'planned' ? 'Start the survey first.' : 'It has been submitted; a manager can return it to you.'
        throw createError({
          statusCode: 409,
          statusMessage: 'Conflict',
          data: { message: `Images can only be added while the survey is in progress or returned. ${why}` },
        })
      }
    },
  }
}
