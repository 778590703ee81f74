import { z } from 'zod'
import { cleanNote, visibleLength } from './text'

/** Reopening undoes a sign-off the producer may already have sent on: it must say why. */
export const ReopenBody = z.object({
  reason: z.string().transform(cleanNote).pipe(z.string().max(1000, 'Use at most 1000 characters'))
    .refine((v) => visibleLength(v) >= 3, 'Say why the reel is reopened (at least 3 characters)'),
})
