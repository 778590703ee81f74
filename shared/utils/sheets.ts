import { z } from 'zod'

/** Reopening undoes a sign-off the producer may already have sent on: it must say why. */
export const ReopenBody = z.object({
  reason: z.string().trim().min(3, 'Say why the reel is reopened (at least 3 characters)').max(1000, 'Use at most 1000 characters'),
})
