import { createReadStream } from 'node:fs'
import { mkdir, rm, stat } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { Readable } from 'node:stream'
import { CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, HeadObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from '@aws-sdk/client-s3'
import type { Config } from '../config'
import { checkKey, type FileStore } from './types'

type S3Settings = Pick<Config, 'S3_ENDPOINT' | 'S3_REGION' | 'S3_BUCKET' | 'S3_PREFIX' | 'S3_ACCESS_KEY_ID' | 'S3_SECRET_ACCESS_KEY' | 'S3_FORCE_PATH_STYLE' | 'STORAGE_DIR'>

const isMissing = (error: unknown) => {
  const e = error as { name?: string; $metadata?: { httpStatusCode?: number } }
  return e.name === 'NotFound' || e.name === 'NoSuchKey' || e.name === 'NoSuchBucket' || e.$metadata?.httpStatusCode === 404
}

/**
 * Files in an S3-compatible bucket (AWS, or any server that speaks the protocol) through the AWS
 * SDK v3. Objects are written whole by one PUT, so a reader never sees half a file; keys name
 * content, so an object never changes. Uploads still arrive in a local folder first (multer), and
 * go to the bucket from there.
 */
export class S3Store implements FileStore {
  readonly description: string
  readonly incomingDir: string
  private readonly client: S3Client
  private readonly bucket: string
  private readonly prefix: string

  constructor(settings: S3Settings) {
    this.bucket = settings.S3_BUCKET
    this.prefix = settings.S3_PREFIX
    this.description = `S3 bucket ${settings.S3_BUCKET}${settings.S3_ENDPOINT ? ` at ${settings.S3_ENDPOINT}` : ''}`
    this.incomingDir = join(settings.STORAGE_DIR || tmpdir(), '.incoming')
    this.client = new S3Client({
      region: settings.S3_REGION,
      forcePathStyle: settings.S3_FORCE_PATH_STYLE,
      // Checksums only where S3 requires them: the streamed "aws-chunked" checksum trailer is not
      // understood by every S3-compatible server, and keys name their content's SHA-256 anyway.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      ...(settings.S3_ENDPOINT ? { endpoint: settings.S3_ENDPOINT } : {}),
      ...(settings.S3_ACCESS_KEY_ID && settings.S3_SECRET_ACCESS_KEY ? { credentials: { accessKeyId: settings.S3_ACCESS_KEY_ID, secretAccessKey: settings.S3_SECRET_ACCESS_KEY } } : {}),
    })
  }

  /** Makes the local arrival folder, and the bucket when it does not exist yet. */
  async init(): Promise<this> {
    await mkdir(this.incomingDir, { recursive: true })
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }))
    } catch (error) {
      if (!isMissing(error)) throw new Error(`the S3 bucket ${this.bucket} cannot be reached: ${(error as Error).message}`, { cause: error })
      await this.client.send(new CreateBucketCommand({ Bucket: this.bucket }))
    }
    return this
  }

  private objectKey(key: string): string {
    return `${this.prefix}${checkKey(key)}`
  }

  async putFile(key: string, localPath: string): Promise<void> {
    const { size } = await stat(localPath)
    await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key), Body: createReadStream(localPath), ContentLength: size }))
    await rm(localPath, { force: true })
  }

  async put(key: string, bytes: Buffer): Promise<void> {
    await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key), Body: bytes, ContentLength: bytes.length }))
  }

  async get(key: string): Promise<Buffer> {
    const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }))
    if (!out.Body) throw new Error(`the object ${key} has no body`)
    return Buffer.from(await out.Body.transformToByteArray())
  }

  async stream(key: string): Promise<Readable> {
    const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }))
    if (!out.Body) throw new Error(`the object ${key} has no body`)
    return out.Body as Readable
  }

  async exists(key: string): Promise<boolean> {
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }))
      return true
    } catch (error) {
      if (isMissing(error)) return false
      throw error
    }
  }

  /** S3 answers a delete of a missing key with success, so an absent value needs no check. */
  async remove(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: this.objectKey(key) }))
  }

  async *list(prefix = ''): AsyncIterable<string> {
    let token: string | undefined
    do {
      const page = await this.client.send(new ListObjectsV2Command({ Bucket: this.bucket, Prefix: `${this.prefix}${prefix}`, ContinuationToken: token }))
      for (const o of page.Contents ?? []) if (o.Key) yield o.Key.slice(this.prefix.length)
      token = page.IsTruncated ? page.NextContinuationToken : undefined
    } while (token)
  }

  close(): void {
    this.client.destroy()
  }
}
