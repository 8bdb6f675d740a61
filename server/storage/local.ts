import { createReadStream } from 'node:fs'
import { access, copyFile, mkdir, readFile, readdir, rename, rm, writeFile } from 'node:fs/promises'
import { randomBytes } from 'node:crypto'
import { dirname, join, relative, sep } from 'node:path'
import type { Readable } from 'node:stream'
import { checkKey, type FileStore } from './types'

/** Files under one folder; writes go to a temporary name first and are renamed, so a crash leaves no half file. */
export class LocalDiskStore implements FileStore {
  readonly description: string
  readonly incomingDir: string

  constructor(private readonly root: string) {
    this.description = `local disk ${root}`
    // Inside the root so a rename never crosses file systems.
    this.incomingDir = join(root, '.incoming')
  }

  async init(): Promise<this> {
    await mkdir(this.incomingDir, { recursive: true })
    return this
  }

  private path(key: string): string {
    return join(this.root, ...checkKey(key).split('/'))
  }

  async putFile(key: string, localPath: string): Promise<void> {
    const target = this.path(key)
    await mkdir(dirname(target), { recursive: true })
    try {
      await rename(localPath, target)
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EXDEV') throw error
      const temporary = `${target}.${randomBytes(6).toString('hex')}.part`
      await copyFile(localPath, temporary)
      await rename(temporary, target)
      await rm(localPath, { force: true })
    }
  }

  async put(key: string, bytes: Buffer): Promise<void> {
    const target = this.path(key)
    await mkdir(dirname(target), { recursive: true })
    const temporary = `${target}.${randomBytes(6).toString('hex')}.part`
    await writeFile(temporary, bytes)
    await rename(temporary, target)
  }

  get(key: string): Promise<Buffer> {
    return readFile(this.path(key))
  }

  async stream(key: string): Promise<Readable> {
    const path = this.path(key)
    await access(path)
    return createReadStream(path)
  }

  async exists(key: string): Promise<boolean> {
    try {
      await access(this.path(key))
      return true
    } catch {
      return false
    }
  }

  async remove(key: string): Promise<void> {
    await rm(this.path(key), { force: true })
  }

  async *list(prefix = ''): AsyncIterable<string> {
    const start = prefix ? this.path(prefix.replace(/\/$/, '')) : this.root
    let entries
    try {
      entries = await readdir(start, { recursive: true, withFileTypes: true })
    } catch {
      return
    }
    for (const e of entries) {
      if (!e.isFile() || e.name.endsWith('.part')) continue
      const key = relative(this.root, join(e.parentPath, e.name)).split(sep).join('/')
      if (!key.startsWith('.incoming/')) yield key
    }
  }
}
