import { z } from 'zod'
import { cleanNote, visibleLength } from './text'

export const DECISIONS = ['accepted', 'rejected', 'waived'] as const
export type Decision = (typeof DECISIONS)[number]

export const DECISION_LABELS: Record<Decision, string> = {
  accepted: 'Accepted',
  rejected: 'Rejected',
  waived: 'Waived',
}

/** A reject or a waiver must say why: the note is what the next person reads (3 visible characters at least). */
export const DecisionBody = z.object({
  decision: z.enum(DECISIONS),
  note: z.string().transform(cleanNote).pipe(z.string().max(1000, 'Use at most 1000 characters')).default(''),
}).superRefine((v, ctx) => {
  if (v.decision !== 'accepted' && visibleLength(v.note) < 3) {
    ctx.addIssue({ code: 'custom', path: ['note'], message: `A note is required to ${v.decision === 'waived' ? 'waive' : 'reject'} a frame` })
  }
})

export const BulkDecisionBody = z.object({
  frameIds: z.array(z.number().int().positive()).min(1, 'Select at least one frame').max(1000),
  decision: z.enum(DECISIONS),
  note: z.string().transform(cleanNote).pipe(z.string().max(1000, 'Use at most 1000 characters')).default(''),
}).superRefine((v, ctx) => {
  if (v.decision !== 'accepted' && visibleLength(v.note) < 3) {
    ctx.addIssue({ code: 'custom', path: ['note'], message: `A note is required to ${v.decision === 'waived' ? 'waive' : 'reject'} frames` })
  }
})
