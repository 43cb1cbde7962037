import type { AttachmentKind } from '#shared/schemas/attachment'
import type { AttachmentCheck, AttachmentSubject, AttachmentWriteOptions } from './attachments'
import { assertWorkOrderExists, mayWorkOn } from './work-orders'

// The work order's side of attachments: repair photos (and visible-light photos) the crew takes. Everyone who may
// see work orders may look; the assigned crew (or a manager) adds them while the order is not closed or cancelled.

/** Images a work order takes: photos of the repair, before and after. */
export const WORK_ORDER_ATTACHMENT_KINDS: readonly AttachmentKind[] = ['repair', 'visible']

export function workOrderSubject(workOrderId: string): AttachmentSubject {
  return { kind: 'work_order', id: workOrderId }
}

/** Reading a work order's photos: the work order must be this organisation's. */
export function workOrderReadCheck(ctx: MemberContext, workOrderId: string): AttachmentCheck {
  return () => assertWorkOrderExists(ctx, workOrderId)
}

/** Adding photos: the assigned crew or a manager, while the work order is still being worked. */
export function workOrderWriteOptions(ctx: MemberContext, workOrderId: string): AttachmentWriteOptions {
  return {
    kinds: WORK_ORDER_ATTACHMENT_KINDS,
    check: async () => {
      const state = await mayWorkOn(ctx, workOrderId)
      if (state === 'closed' || state === 'cancelled') {
        throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message: 'A closed or cancelled work order is kept as it was.' } })
      }
    },
  }
}
