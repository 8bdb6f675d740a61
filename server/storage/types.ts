import type { Readable } from 'node:stream'

/**
 * Where uploaded files are kept. Keys are relative names such as `raw/ab/ab12…`; values never
 * change once written (a key names its content), so a copy taken at any moment is consistent; a
 * value goes only when the last spectrum that holds it is withdrawn.
 * The local-disk store is the default; an object store can take its place behind the same methods.
 */
export interface FileStore {
  /** A short description for logs, e.g. `local disk /srv/lineweight/files`. */
  readonly description: string
  /** A local folder where uploads are written while they arrive, before they are stored. */
  readonly incomingDir: string
  /** Stores the finished local file under `key`; the local file is gone afterwards. */
  putFile(key: string, localPath: string): Promise<void>
  put(key: string, bytes: Buffer): Promise<void>
  get(key: string): Promise<Buffer>
  stream(key: string): Promise<Readable>
  exists(key: string): Promise<boolean>
  /** Removes the value (a withdrawn upload no other spectrum shares); nothing happens when it is absent. */
  remove(key: string): Promise<void>
  /** Every key under the prefix (backups, checks). */
  list(prefix?: string): AsyncIterable<string>
}

/** Keys are lower-case paths of safe characters: no `..`, no leading slash. */
export function checkKey(key: string): string {
  if (!/^[a-z0-9][a-z0-9_.-]*(\/[a-z0-9][a-z0-9_.-]*)*$/.test(key)) throw new Error(`not a valid file-store key: ${key}`)
  return key
}

/** The key of an uploaded file: named by its SHA-256, so one content is stored once. */
export const rawFileKey = (sha256: string) => checkKey(`raw/${sha256.slice(0, 2)}/${sha256}`)
