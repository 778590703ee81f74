// The local S3 fake: s3rver, started with the bucket and CORS rules the app needs, with one
// repair so that it answers as S3 does where s3rver 3.7 crashes.
//
// CompleteMultipartUpload naming a part that was never uploaded (or with another part's
// ETag) makes s3rver read a missing file outside any promise: the whole process dies with
// ENOENT and every later request is refused. S3 answers 400 InvalidPart instead
// ("One or more of the specified parts could not be found. The part may not have been
// uploaded, or the specified entity tag may not match the part's entity tag." — Amazon S3
// API Reference, CompleteMultipartUpload, Errors). The store below checks each named part
// and its MD5 before s3rver concatenates them, and throws that error.
//
// Usage: node docker-local/s3-fake.mjs <dataDir> <address> <port> <bucket> <cors.xml>
import { createRequire } from 'node:module'
import { mkdirSync, readFileSync } from 'node:fs'
import { readFile } from 'node:fs/promises'
import { join } from 'node:path'

const require = createRequire(import.meta.url)
const S3rver = require('s3rver')
const FilesystemStore = require('s3rver/lib/stores/filesystem')
const S3Error = require('s3rver/lib/models/error')

const [dir, address, port, bucket, cors] = process.argv.slice(2)
if (!dir || !address || !port || !bucket || !cors) {
  console.error('usage: s3-fake.mjs <dataDir> <address> <port> <bucket> <cors.xml>')
  process.exit(2)
}

const putObjectMultipart = FilesystemStore.prototype.putObjectMultipart
FilesystemStore.prototype.putObjectMultipart = async function checkedPutObjectMultipart(bucketName, uploadId, parts) {
  const uploadDir = join(this.getResourcePath(bucketName, undefined, 'uploads'), String(uploadId))
  for (const part of parts) {
    const stored = await readFile(join(uploadDir, `${part.number}.md5`), 'utf8').catch(() => null)
    if (stored === null || stored.trim() !== String(part.etag).trim()) {
      throw new S3Error('InvalidPart', 'One or more of the specified parts could not be found. The part may not have been '
        + 'uploaded, or the specified entity tag may not match the part\'s entity tag.', { PartNumber: part.number, UploadId: uploadId })
    }
  }
  return putObjectMultipart.call(this, bucketName, uploadId, parts)
}

mkdirSync(dir, { recursive: true })
const server = new S3rver({
  directory: dir,
  address,
  port: Number(port),
  silent: true,
  configureBuckets: [{ name: bucket, configs: [readFileSync(cors)] }],
})
server.run((err, { address: host, port: bound } = {}) => {
  if (err) { console.error(err); process.exit(1) }
  console.log(`S3 fake listening on ${host}:${bound}`)
})
