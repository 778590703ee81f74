import { z } from 'zod'
import { IdSchema } from './validation'

/** PUT /api/productions/:id/reference: the bars frame the production's sources are matched to. */
export const ReferenceBody = z.object({ frameId: IdSchema })
