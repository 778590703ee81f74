import type { Queue } from 'bullmq'
import { IntakeError, checkFileName, inspectUpload, type Received } from '../lib/intake'
import { createFrame, queueFrame } from '../lib/frames'
import { QUEUE_ANALYSE, type AnalyseJob } from '../../shared/utils/queues'
import type { FrameFormat } from '../../shared/utils/uploads'

export interface IntakeResult {
  name: string
  ok: boolean
  frameId?: number
  duplicate?: boolean
  queued?: boolean
  status?: number
  reason?: string
}

export const intakeRefusal = (name: string, e: IntakeError): IntakeResult => ({ name: name.slice(0, 200), ok: false, status: e.status, reason: e.reason })

/**
 * One file into one frame, or one clear refusal. Either way the answer names the file, so
 * a batch reports every file and one bad file never stops the others.
 */
export async function intakeFile(args: {
  teamId: number; reelId: number; userId: number; name: string; bytes: Uint8Array
  format: FrameFormat; rawWidth?: number | null; rawHeight?: number | null; storedAt?: string
}): Promise<IntakeResult> {
  try {
    const name = checkFileName(args.name)
    const inspected = await inspectUpload(args.bytes, { format: args.format, rawWidth: args.rawWidth, rawHeight: args.rawHeight })
    return await storeFrame({ ...args, file: { name, bytes: args.bytes, inspected } })
  } catch (e) {
    if (e instanceof IntakeError) return intakeRefusal(args.name, e)
    throw e
  }
}

/** A checked file (see receiveFile) into a frame and onto the queue. */
export async function storeFrame(args: {
  teamId: number; reelId: number; userId: number; storedAt?: string
  file: Omit<Received, 'sha256'> & { sha256?: string }
}): Promise<IntakeResult> {
  const { file } = args
  try {
    const { frame, duplicate } = await createFrame(useDb(), useStorageS3(), {
      teamId: args.teamId, reelId: args.reelId, name: file.name, bytes: file.bytes, sha256: file.sha256, inspected: file.inspected,
      uploadedBy: args.userId, storedAt: args.storedAt,
    })
    const queued = duplicate ? true : await queueFrame(useQueue(QUEUE_ANALYSE) as Queue<AnalyseJob>, frame.id)
    return { name: file.name, ok: true, frameId: frame.id, duplicate, queued }
  } catch (e) {
    if (e instanceof IntakeError) return intakeRefusal(file.name, e)
    throw e
  }
}
