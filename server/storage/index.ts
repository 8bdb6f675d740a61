import type { Config } from '../config'
import { LocalDiskStore } from './local'
import { S3Store } from './s3'
import type { FileStore } from './types'

export type { FileStore } from './types'
export { rawFileKey } from './types'

type StoreSettings = Pick<Config, 'STORAGE_DRIVER' | 'STORAGE_DIR'> &
  Partial<Pick<Config, 'S3_ENDPOINT' | 'S3_REGION' | 'S3_BUCKET' | 'S3_PREFIX' | 'S3_ACCESS_KEY_ID' | 'S3_SECRET_ACCESS_KEY' | 'S3_FORCE_PATH_STYLE'>>

/** The configured file store: `local` disk (the default) or an `s3`-compatible bucket. */
export async function createFileStore(config: StoreSettings): Promise<FileStore> {
  switch (config.STORAGE_DRIVER) {
    case 'local':
      return new LocalDiskStore(config.STORAGE_DIR).init()
    case 's3':
      return new S3Store({
        STORAGE_DIR: config.STORAGE_DIR,
        S3_ENDPOINT: config.S3_ENDPOINT,
        S3_REGION: config.S3_REGION ?? 'us-east-1',
        S3_BUCKET: config.S3_BUCKET ?? 'lineweight',
        S3_PREFIX: config.S3_PREFIX ?? '',
        S3_ACCESS_KEY_ID: config.S3_ACCESS_KEY_ID,
        S3_SECRET_ACCESS_KEY: config.S3_SECRET_ACCESS_KEY,
        S3_FORCE_PATH_STYLE: config.S3_FORCE_PATH_STYLE ?? true,
      }).init()
  }
}
