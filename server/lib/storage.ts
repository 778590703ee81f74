// S3 access shared by the Nitro server and the worker. The same code talks to the local
// fake and to any real S3: only the NUXT_S3_* settings differ.
import {
  AbortMultipartUploadCommand, CompleteMultipartUploadCommand, CreateMultipartUploadCommand, GetObjectCommand,
  HeadObjectCommand, PutObjectCommand, S3Client, UploadPartCommand, DeleteObjectCommand,
} from '@aws-sdk/client-s3'
import { getSignedUrl } from '@aws-sdk/s3-request-presigner'

export interface StorageConfig {
  endpoint?: string
  region: string
  bucket: string
  accessKeyId?: string
  secretAccessKey?: string
}

export function storageConfigFromEnv(env: NodeJS.ProcessEnv = process.env): StorageConfig {
  return {
    endpoint: env.NUXT_S3_ENDPOINT || undefined,
    region: env.NUXT_S3_REGION || 'us-east-1',
    bucket: env.NUXT_S3_BUCKET || 'linewise',
    accessKeyId: env.NUXT_S3_ACCESS_KEY_ID || undefined,
    secretAccessKey: env.NUXT_S3_SECRET_ACCESS_KEY || undefined,
  }
}

export class Storage {
  readonly client: S3Client
  readonly bucket: string

  constructor(cfg: StorageConfig) {
    this.bucket = cfg.bucket
    this.client = new S3Client({
      region: cfg.region,
      endpoint: cfg.endpoint,
      // Path-style works with the fake and with every S3-compatible store.
      forcePathStyle: !!cfg.endpoint,
      credentials: cfg.accessKeyId && cfg.secretAccessKey ? { accessKeyId: cfg.accessKeyId, secretAccessKey: cfg.secretAccessKey } : undefined,
      // Otherwise presigned PUT URLs carry checksum headers computed for an empty body.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    })
  }

  /**
   * `sha256` (hex) is the body's SHA-256 when the caller already has it: the request is then
   * signed with it instead of the SDK hashing the whole body a second time (SigV4 signs the
   * payload hash, x-amz-content-sha256; S3 checks it against the bytes it receives).
   */
  async put(key: string, body: Uint8Array, contentType: string, sha256?: string) {
    const command = new PutObjectCommand({ Bucket: this.bucket, Key: key, Body: body, ContentType: contentType })
    if (sha256) {
      command.middlewareStack.add((next) => (args) => {
        const request = args.request as { headers?: Record<string, string> }
        if (request.headers) request.headers['x-amz-content-sha256'] = sha256
        return next(args)
      }, { step: 'build', name: 'knownPayloadHash' })
    }
    await this.client.send(command)
  }

  async get(key: string): Promise<Uint8Array> {
    const res = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }))
    return res.Body!.transformToByteArray()
  }

  /** The first `bytes` bytes of an object (for sniffing its type). */
  async head(key: string, bytes: number): Promise<Uint8Array> {
    const res = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key, Range: `bytes=0-${bytes - 1}` }))
    return res.Body!.transformToByteArray()
  }

  /** Bytes [start, end) of an object. */
  async getRange(key: string, start: number, end: number): Promise<Uint8Array> {
    if (end <= start) return new Uint8Array(0)
    const res = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key, Range: `bytes=${start}-${end - 1}` }))
    return res.Body!.transformToByteArray()
  }

  /** Size of an object, or null when it does not exist. */
  async size(key: string): Promise<number | null> {
    try {
      const res = await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: key }))
      return res.ContentLength ?? null
    } catch (e) {
      const status = (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode
      if (status === 404 || (e as Error).name === 'NotFound') return null
      throw e
    }
  }

  async delete(key: string) {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: key }))
  }

  presignPut(key: string, contentLength: number, expiresIn = 3600) {
    return getSignedUrl(this.client, new PutObjectCommand({ Bucket: this.bucket, Key: key, ContentLength: contentLength }), { expiresIn })
  }

  async startMultipart(key: string) {
    const res = await this.client.send(new CreateMultipartUploadCommand({ Bucket: this.bucket, Key: key }))
    return res.UploadId!
  }

  presignPart(key: string, uploadId: string, partNumber: number, expiresIn = 3600) {
    return getSignedUrl(this.client, new UploadPartCommand({ Bucket: this.bucket, Key: key, UploadId: uploadId, PartNumber: partNumber }), { expiresIn })
  }

  async completeMultipart(key: string, uploadId: string, parts: { partNumber: number; etag: string }[]) {
    await this.client.send(new CompleteMultipartUploadCommand({
      Bucket: this.bucket, Key: key, UploadId: uploadId,
      MultipartUpload: { Parts: parts.map((p) => ({ PartNumber: p.partNumber, ETag: p.etag })) },
    }))
  }

  async abortMultipart(key: string, uploadId: string) {
    await this.client.send(new AbortMultipartUploadCommand({ Bucket: this.bucket, Key: key, UploadId: uploadId })).catch(() => {})
  }
}

/** Object keys are built here only, from ids: never from a file name a person sent. */
export const keys = {
  upload: (teamId: number, reelId: number, uploadId: number) => `teams/${teamId}/reels/${reelId}/uploads/${uploadId}`,
  original: (teamId: number, reelId: number, sha256: string) => `teams/${teamId}/reels/${reelId}/originals/${sha256}`,
  image: (teamId: number, frameId: number, kind: string) => `teams/${teamId}/frames/${frameId}/${kind}.png`,
  /** The frame's line data (server/lib/frame-lines.ts), read a line at a time for line plots. */
  lines: (teamId: number, frameId: number) => `teams/${teamId}/frames/${frameId}/lines.bin`,
}
