import { Storage } from '../lib/storage'

let storage: Storage | undefined

export function useStorageS3(): Storage {
  const c = useRuntimeConfig()
  storage ??= new Storage({ endpoint: c.s3Endpoint || undefined, region: c.s3Region, bucket: c.s3Bucket, accessKeyId: c.s3AccessKeyId, secretAccessKey: c.s3SecretAccessKey })
  return storage
}
