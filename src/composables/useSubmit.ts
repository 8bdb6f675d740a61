import { computed, reactive, ref, shallowRef } from 'vue'
import { ApiError, messageOf } from '@/api/http'
import { uploadSpectrumFiles, type FileResult, type SubmitFields, type UploadHandle, type WavelengthUnitChoice } from '@/api/spectra'
import type { RefusedEntry } from '@/lib/refusedLog'
import { coordinateError, type MetadataDraft } from '@/lib/spectrumMetadata'

/** The batch form as the person fills it in; empty means "take it from the file". */
export interface BatchMetadata extends MetadataDraft {
  campaignId: number | null
  wavelengthMedium: 'file' | 'air' | 'vacuum'
  wavelengthUnit: WavelengthUnitChoice
  hdu: number | null
  aperture: number | null
}

export const emptyBatchMetadata = (): BatchMetadata => ({
  campaignId: null,
  objectName: '',
  ra: '',
  dec: '',
  obsDate: null,
  instrument: '',
  instrumentId: null,
  resolutionKind: 'fwhm',
  resolution: null,
  vMag: null,
  parallaxMas: null,
  parallaxErrorMas: null,
  ebv: null,
  wavelengthMedium: 'file',
  wavelengthUnit: 'file',
  hdu: null,
  aperture: null,
  notes: '',
})

const num = (v: number | null) => (v === null || !Number.isFinite(v) ? undefined : v)
const text = (v: string | null) => (v && v.trim() !== '' ? v.trim() : undefined)

/** The multipart fields for the batch (undefined ones are not sent). */
export function toSubmitFields(meta: BatchMetadata, batchId: string): SubmitFields {
  return {
    campaignId: meta.campaignId ?? 0,
    batchId,
    objectName: text(meta.objectName),
    ra: text(meta.ra),
    dec: text(meta.dec),
    obsDate: text(meta.obsDate),
    instrument: text(meta.instrument),
    instrumentId: meta.instrumentId ?? undefined,
    resolutionFwhm: meta.resolutionKind === 'fwhm' ? num(meta.resolution) : undefined,
    resolvingPower: meta.resolutionKind === 'power' ? num(meta.resolution) : undefined,
    vMag: num(meta.vMag),
    parallaxMas: num(meta.parallaxMas),
    parallaxErrorMas: num(meta.parallaxErrorMas),
    ebv: num(meta.ebv),
    wavelengthMedium: meta.wavelengthMedium,
    wavelengthUnit: meta.wavelengthUnit === 'file' ? undefined : meta.wavelengthUnit,
    hdu: num(meta.hdu),
    aperture: num(meta.aperture),
    notes: text(meta.notes),
  }
}

/** Checks the browser can make before sending anything; the server checks everything again. */
export function checkBatchMetadata(meta: BatchMetadata): Record<string, string> {
  const errors: Record<string, string> = {}
  if (meta.campaignId === null) errors.campaignId = 'choose a campaign'
  for (const kind of ['ra', 'dec'] as const) {
    const message = coordinateError(kind, meta[kind])
    if (message) errors[kind] = message
  }
  if (meta.parallaxErrorMas !== null && meta.parallaxMas === null) errors.parallaxMas = 'is needed when an error is given'
  return errors
}

export type UploadStatus = 'waiting' | 'uploading' | 'done' | 'failed'

export interface UploadItem {
  key: string
  file: File
  status: UploadStatus
  progress: number
  results: FileResult[]
  error: { status: number; code: string; message: string } | null
}

export type ResultKind = 'waiting' | 'uploading' | 'accepted' | 'duplicate' | 'refused' | 'failed'

/** One row of the results table: a server result per file (a zip gives one per entry), or the upload's own state. */
export interface ResultRow {
  key: string
  file: string
  kind: ResultKind
  progress: number
  result: FileResult | null
  message: string | null
  code: string | null
}

export function resultRows(items: readonly UploadItem[]): ResultRow[] {
  const rows: ResultRow[] = []
  for (const item of items) {
    if (item.status === 'done' && item.results.length > 0) {
      item.results.forEach((r, i) =>
        rows.push({
          key: `${item.key}:${i}`,
          file: r.file,
          kind: r.outcome,
          progress: 1,
          result: r,
          message: r.outcome === 'accepted' ? null : r.message,
          code: r.outcome === 'refused' ? r.code : null,
        }),
      )
      continue
    }
    const kind: ResultKind = item.status === 'done' ? 'refused' : item.status
    rows.push({
      key: item.key,
      file: item.file.name,
      kind,
      progress: item.progress,
      result: null,
      message: item.status === 'done' ? 'The server returned no result for this file.' : (item.error?.message ?? null),
      code: item.error?.code ?? null,
    })
  }
  return rows
}

export interface ResultCounts {
  files: number
  accepted: number
  duplicate: number
  refused: number
  failed: number
  pending: number
}

export function countResults(rows: readonly ResultRow[]): ResultCounts {
  const c: ResultCounts = { files: rows.length, accepted: 0, duplicate: 0, refused: 0, failed: 0, pending: 0 }
  for (const r of rows) {
    if (r.kind === 'waiting' || r.kind === 'uploading') c.pending++
    else c[r.kind]++
  }
  return c
}

/** Errors that would be the same for every file of the batch: stop and show them on the form. */
function isBatchError(e: ApiError): boolean {
  return (e.status === 422 && Object.keys(e.fields).length > 0) || e.status === 401 || (e.status === 403 && e.code !== 'csrf_failed') || e.status === 404
}

let keySeq = 0

const isZipName = (name: string) => /\.zip$/i.test(name)

/** Waiting a while: Retry-After when the server gave one, else `fallbackMs`. */
const pause = (e: ApiError, fallbackMs: number) => {
  const seconds = e.details?.retryAfterSeconds
  const ms = typeof seconds === 'number' && Number.isFinite(seconds) ? Math.max(250, seconds * 1000) : fallbackMs
  return new Promise((r) => setTimeout(r, ms))
}

/** Answers that mean "not now": the file goes back in line and is sent again after the wait. */
const isBusy = (e: ApiError) => e.status === 429 || e.status === 503

/**
 * Takes the next request's worth of files off the front of the line: up to `maxFiles` files and
 * `maxBytes` bytes (always at least one file), no two with the same name. Results come back in
 * file order; a zip answers with a line per entry and a large file may be refused for its size
 * with the whole request, so each of those travels alone.
 */
export function takeBatch<T extends { file: File }>(line: T[], maxFiles: number, maxBytes: number): T[] {
  const batch: T[] = []
  const names = new Set<string>()
  let bytes = 0
  while (line.length > 0) {
    const next = line[0]!
    // A zip, or a file large enough to be refused for its size alone, travels alone so its answer is its own.
    const alone = isZipName(next.file.name) || next.file.size > maxBytes / 4
    if (batch.length > 0 && (alone || batch.length >= maxFiles || bytes + next.file.size > maxBytes || names.has(next.file.name))) break
    line.shift()
    batch.push(next)
    bytes += next.file.size
    names.add(next.file.name)
    if (alone) break
  }
  return batch
}

/**
 * A batch upload: files go to the server several to a request (up to `batchFiles` files or
 * `batchBytes` bytes), two requests at a time, each file with the progress of its request. When
 * the server is busy or the person's upload allowance is used up (429, 503), the files go back in
 * line and are sent again after the wait the server asked for (Retry-After). One bad file never
 * stops the others; an error about the form itself (a 422 with field messages, a campaign one may
 * not submit to) stops the batch and is shown on the form.
 */
export function useSubmit(options: { parallel?: number; busyRetryMs?: number; batchFiles?: number; batchBytes?: number; onRefused?: (entries: RefusedEntry[]) => void } = {}) {
  // The server takes two uploads of one person at a time (UPLOADS_PER_USER); more wait their turn.
  const parallel = options.parallel ?? 2
  const busyRetryMs = options.busyRetryMs ?? 2000
  const batchFiles = options.batchFiles ?? 25
  const batchBytes = options.batchBytes ?? 16 * 1024 * 1024
  const items = ref<UploadItem[]>([])
  const running = ref(false)
  const batchId = ref<string | null>(null)
  const fieldErrors = ref<Record<string, string>>({})
  const formError = ref<string | null>(null)
  const handles = shallowRef(new Map<string, UploadHandle>())
  const state = computed(() => (running.value ? 'loading' : items.value.some((i) => i.status === 'done' || i.status === 'failed') ? 'done' : 'idle'))

  const rows = computed(() => resultRows(items.value))
  const counts = computed(() => countResults(rows.value))

  function add(files: Iterable<File>): void {
    for (const file of files) items.value.push(reactive({ key: `f${++keySeq}`, file, status: 'waiting', progress: 0, results: [], error: null }) as UploadItem)
  }

  function remove(key: string): void {
    items.value = items.value.filter((i) => i.key !== key || i.status === 'uploading')
  }

  /** Forgets the finished batch so a new one can start (files not yet sent stay). */
  function clearFinished(): void {
    items.value = items.value.filter((i) => i.status === 'waiting')
    batchId.value = null
  }

  async function start(meta: BatchMetadata): Promise<void> {
    if (running.value) return
    formError.value = null
    fieldErrors.value = checkBatchMetadata(meta)
    if (Object.keys(fieldErrors.value).length > 0) return
    const queue = items.value.filter((i) => i.status === 'waiting' || i.status === 'failed')
    if (queue.length === 0) {
      formError.value = 'Add at least one file.'
      return
    }
    batchId.value ??= globalThis.crypto.randomUUID()
    const fields = toSubmitFields(meta, batchId.value)
    running.value = true
    let stop = false
    for (const i of queue) {
      i.status = 'waiting'
      i.error = null
      i.progress = 0
    }

    const worker = async () => {
      for (;;) {
        if (stop) return
        const batch = takeBatch(queue, batchFiles, batchBytes)
        if (batch.length === 0) return
        for (const item of batch) item.status = 'uploading'
        const handle = uploadSpectrumFiles(
          fields,
          batch.map((i) => ({ file: i.file, name: i.file.name })),
          (f) => batch.forEach((i) => (i.progress = f)),
        )
        const key = batch[0]!.key
        handles.value.set(key, handle)
        try {
          const reply = await handle.promise
          // Results come in file order; a zip (always alone) answers with a line per entry.
          let at = 0
          for (const item of batch) {
            const take = isZipName(item.file.name) ? reply.results.length - at : 1
            item.results = reply.results.slice(at, at + take)
            at += take
            item.progress = 1
            item.status = 'done'
          }
          const refused = reply.results.flatMap((r) =>
            r.outcome === 'refused' ? [{ at: new Date().toISOString(), file: r.file, kind: 'refused' as const, code: r.code, message: r.message, campaignId: fields.campaignId ?? null }] : [],
          )
          if (refused.length > 0) options.onRefused?.(refused)
        } catch (e) {
          const err = e instanceof ApiError ? e : new ApiError(0, 'client_error', messageOf(e))
          if (isBusy(err)) {
            for (const item of batch) {
              item.status = 'waiting'
              item.progress = 0
            }
            queue.unshift(...batch)
            await pause(err, busyRetryMs)
          } else if (isBatchError(err)) {
            stop = true
            for (const item of batch) {
              item.status = 'waiting'
              item.progress = 0
            }
            fieldErrors.value = err.fields
            formError.value = Object.keys(err.fields).length > 0 ? 'The server did not accept the batch details; see the marked fields.' : err.message
          } else {
            const code = err.status === 0 ? 'network' : err.status === 413 ? 'too_large' : err.code
            for (const item of batch) {
              item.status = 'failed'
              item.error = { status: err.status, code, message: err.message }
            }
            options.onRefused?.(
              batch.map((item) => ({ at: new Date().toISOString(), file: item.file.name, kind: 'not sent' as const, code, message: err.message, campaignId: fields.campaignId ?? null })),
            )
          }
        } finally {
          handles.value.delete(key)
        }
      }
    }
    try {
      await Promise.all(Array.from({ length: Math.min(parallel, queue.length) }, worker))
    } finally {
      running.value = false
    }
  }

  function cancel(): void {
    for (const h of handles.value.values()) h.abort()
  }

  return { items, rows, counts, running, state, batchId, fieldErrors, formError, add, remove, clearFinished, start, cancel }
}
