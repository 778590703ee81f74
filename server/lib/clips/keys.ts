// S3 keys of a clip's objects (from ids only) and a presigned GET for ffmpeg to read the
// original by range requests, so no worker copies a clip to local disk.
import { GetObjectCommand, UploadPartCommand } from '@aws-sdk/client-s3'
import { getSignedUrl } from '@aws-sdk/s3-request-presigner'
import type { Storage } from '../storage'

export const clipKeys = {
  original: (teamId: number, reelId: number, clipId: number) => `teams/${teamId}/reels/${reelId}/clips/${clipId}/original`,
  chunk: (teamId: number, clipId: number, idx: number) => `teams/${teamId}/clips/${clipId}/chunks/${idx}.lwtl`,
  timeline: (teamId: number, clipId: number) => `teams/${teamId}/clips/${clipId}/timeline.lwtl`,
}

/** Long enough for ffmpeg to read a chunk of a long programme over a slow link. */
const READ_URL_SECONDS = 6 * 3600

export function presignGet(storage: Storage, key: string, expiresIn = READ_URL_SECONDS): Promise<string> {
  return getSignedUrl(storage.client, new GetObjectCommand({ Bucket: storage.bucket, Key: key }), { expiresIn })
}

/** Sends one part of a multipart upload from the server (the scripted clip route); returns its ETag. */
export async function uploadPart(storage: Storage, key: string, uploadId: string, partNumber: number, body: Uint8Array): Promise<string> {
  const res = await storage.client.send(new UploadPartCommand({ Bucket: storage.bucket, Key: key, UploadId: uploadId, PartNumber: partNumber, Body: body }))
  if (!res.ETag) throw new Error(`S3 gave no ETag for part ${partNumber}`)
  return res.ETag
}
