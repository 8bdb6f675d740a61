import type { Config } from '../config'
import { LocalDiskStore } from './local'
import type { FileStore } from './types'

export type { FileStore } from './types'
export { rawFileKey } from './types'

/** The configured file store (STORAGE_DRIVER; only `local` so far). */
export async function createFileStore(config: Pick<Config, 'STORAGE_DRIVER' | 'STORAGE_DIR'>): Promise<FileStore> {
  switch (config.STORAGE_DRIVER) {
    case 'local':
      return new LocalDiskStore(config.STORAGE_DIR).init()
  }
}
