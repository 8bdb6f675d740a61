// Reading an uploaded file (its SHA-256, the reader, S/N, the arrays as they are stored) and
// unpacking zip archives. A large file or archive takes seconds of CPU, so the server does both in
// a small pool of worker threads (read-worker.ts) and the thread that answers requests only waits;
// without a pool (tests, the demo seed) the same steps run on the calling thread.
import { createHash } from 'node:crypto'
import { readFile } from 'node:fs/promises'
import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import { DEFAULT_CLASSIFICATION_REGION } from '../../shared/grid'
import { float32ToBuffer, float64ToBuffer } from '../lib/binary'
import { readSpectrum, unpackZip, type ReadMeta, type ReadOptions, type ReadSuccess, type RefusalCode, type UnzipResult, type ZipLimits } from '../spectra/io'
import { estimateSpectrumSnr } from '../spectra/prepare/snr'
import { kthSmallest } from '../spectra/prepare/stats'

/** An uploaded file's bytes: in memory, or where the upload parser wrote them. */
export type FileSource = { bytes: Uint8Array } | { path: string }

/** The spectrum row's columns that a read decides. */
export interface ReadRow {
  format: ReadMeta['format']
  hdu: number | null
  pixels: number
  wlMin: number
  wlMax: number
  dispersion: number
  snr: number | null
  vacuumConverted: boolean
  readInfo: string
}

/** The stored arrays (little-endian BLOB columns). */
export interface ReadBlob {
  wavelength: Buffer
  flux: Buffer
  error: Buffer | null
  mask: Buffer | null
}

export type ReadOutcome = { ok: true; meta: ReadMeta; row: ReadRow; blob: ReadBlob } | { ok: false; code: RefusalCode; message: string }

export interface ReadAnswer {
  sha256: string
  /** Bytes in the file. */
  size: number
  read: ReadOutcome
  /** The file's bytes when they were sent in memory (handed back after a thread read them). */
  bytes?: Uint8Array
}

/** Reads and unpacks uploads; `ReadPool` does it in worker threads, `readHere` on the calling thread. */
export interface FileReading {
  read(name: string, source: FileSource, options: ReadOptions): Promise<ReadAnswer>
  unzip(source: FileSource, limits: ZipLimits): Promise<UnzipResult>
}

const bytesOf = async (source: FileSource): Promise<Uint8Array> => {
  if ('bytes' in source) return source.bytes
  const b = await readFile(source.path)
  return new Uint8Array(b.buffer, b.byteOffset, b.byteLength)
}

/** Median Å per pixel. */
function medianDispersion(wl: Float64Array): number {
  const d = new Float64Array(wl.length - 1)
  for (let i = 1; i < wl.length; i++) d[i - 1] = wl[i]! - wl[i - 1]!
  // The value a sort puts in the middle, found by selection.
  return d.length > 0 ? kthSmallest(d, d.length >> 1) : 0
}

/** The columns and arrays a read gives a spectrum row and its blob. */
export function readColumns(read: ReadSuccess): { row: ReadRow; blob: ReadBlob } {
  const { spectrum: s, meta } = read
  const wl = s.wavelengthAir
  const snr = estimateSpectrumSnr({ wavelength: wl, flux: s.flux, ...(s.mask ? { mask: s.mask } : {}) }, { region: DEFAULT_CLASSIFICATION_REGION })
  return {
    row: {
      format: meta.format,
      hdu: meta.hdu ?? null,
      pixels: wl.length,
      wlMin: wl[0]!,
      wlMax: wl[wl.length - 1]!,
      dispersion: medianDispersion(wl),
      snr: snr !== null && Number.isFinite(snr) ? snr : null,
      vacuumConverted: meta.vacuumConverted,
      readInfo: JSON.stringify(meta),
    },
    blob: {
      wavelength: float64ToBuffer(wl),
      flux: float32ToBuffer(s.flux),
      error: s.error ? float32ToBuffer(s.error) : null,
      mask: s.mask ? Buffer.from(s.mask) : null,
    },
  }
}

/** Hashes and reads one file. */
export async function readUpload(name: string, source: FileSource, options: ReadOptions): Promise<ReadAnswer> {
  const bytes = await bytesOf(source)
  const sha256 = createHash('sha256').update(bytes).digest('hex')
  const result = readSpectrum(bytes, name, options)
  const read: ReadOutcome = result.ok ? { ok: true, meta: result.meta, ...readColumns(result) } : { ok: false, code: result.code, message: result.message }
  return { sha256, size: bytes.byteLength, read, ...('bytes' in source ? { bytes } : {}) }
}

/** Unpacks a zip archive within the limits. */
export async function unzipUpload(source: FileSource, limits: ZipLimits): Promise<UnzipResult> {
  return unpackZip(await bytesOf(source), limits)
}

/** Reading on the calling thread. */
export const readHere: FileReading = { read: readUpload, unzip: unzipUpload }

export type ReadTask = { kind: 'read'; name: string; source: FileSource; options: ReadOptions } | { kind: 'unzip'; source: FileSource; limits: ZipLimits }

/**
 * A view whose memory can be moved to another thread: itself when it alone covers its
 * ArrayBuffer, else a copy (small Buffers share Node's allocation pool, and moving a view of
 * the pool would take the pool from everything else that uses it).
 */
export function ownView<T extends Uint8Array>(view: T): Uint8Array {
  const buffer = view.buffer
  if (buffer instanceof ArrayBuffer && view.byteOffset === 0 && view.byteLength === buffer.byteLength) return view
  return new Uint8Array(view)
}

/** The distinct ArrayBuffers of these views, for a transfer list. */
export function transferList(views: Array<Uint8Array | null | undefined>): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>()
  for (const v of views) if (v && v.buffer instanceof ArrayBuffer && v.byteLength > 0) out.add(v.buffer)
  return [...out]
}

const asBuffer = (v: Uint8Array) => Buffer.from(v.buffer, v.byteOffset, v.byteLength)
const asBufferOrNull = (v: Uint8Array | null) => (v ? asBuffer(v) : null)

/** Moves a source's bytes to the thread (they come back with the answer); a path goes as it is. */
function sendable(source: FileSource): { source: FileSource; transfer: ArrayBuffer[] } {
  if (!('bytes' in source)) return { source, transfer: [] }
  const bytes = ownView(source.bytes)
  return { source: { bytes }, transfer: transferList([bytes]) }
}

export interface ReadPoolOptions {
  /** Threads; 0 = one with two cores or fewer, else two. */
  threads: number
  /** Start the threads at once and keep them, so the first upload does not wait for one to load. @default true */
  keepStarted?: boolean
  /** Node options for the threads (a process not started by tsx passes `--import tsx`). */
  execArgv?: string[]
}

/** Reading in a pool of worker threads. In-memory bytes are moved to the thread and back, not copied. */
export class ReadPool implements FileReading {
  private readonly pool: Piscina
  readonly threads: number

  constructor(options: ReadPoolOptions) {
    this.threads = options.threads > 0 ? options.threads : Math.min(2, Math.max(1, availableParallelism() - 1))
    const keep = options.keepStarted ?? true
    this.pool = new Piscina({
      filename: new URL('./read-worker.ts', import.meta.url).href,
      maxThreads: this.threads,
      minThreads: keep ? this.threads : 0,
      idleTimeout: keep ? Number.POSITIVE_INFINITY : 10_000,
      ...(options.execArgv ? { execArgv: options.execArgv } : {}),
    })
  }

  /** Tasks the threads have finished. */
  get completed(): number {
    return this.pool.completed
  }

  async read(name: string, source: FileSource, options: ReadOptions): Promise<ReadAnswer> {
    const sent = sendable(source)
    const task: ReadTask = { kind: 'read', name, source: sent.source, options }
    const answer = (await this.pool.run(task, { transferList: sent.transfer })) as ReadAnswer
    const read = answer.read
    if (read.ok) read.blob = { wavelength: asBuffer(read.blob.wavelength), flux: asBuffer(read.blob.flux), error: asBufferOrNull(read.blob.error), mask: asBufferOrNull(read.blob.mask) }
    return answer
  }

  async unzip(source: FileSource, limits: ZipLimits): Promise<UnzipResult> {
    const sent = sendable(source)
    const task: ReadTask = { kind: 'unzip', source: sent.source, limits }
    return (await this.pool.run(task, { transferList: sent.transfer })) as UnzipResult
  }

  async close(): Promise<void> {
    await this.pool.destroy()
  }
}
