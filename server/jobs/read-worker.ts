// Runs in a thread of the read pool (reading.ts): one file read or one archive unpacked. The
// arrays of the answer are moved back to the calling thread, not copied.
import { move, transferableSymbol, valueSymbol } from 'piscina'
import { ownView, readUpload, transferList, unzipUpload, type ReadTask } from './reading'

/** Sends `value` with the memory of `views` moved rather than copied. */
function movable<T>(value: T, views: Array<Uint8Array | null | undefined>): T {
  return move({ [transferableSymbol]: transferList(views), [valueSymbol]: value } as never) as T
}

export default async function run(task: ReadTask) {
  if (task.kind === 'unzip') {
    const result = await unzipUpload(task.source, task.limits)
    if (!result.ok) return result
    const entries = result.entries.map((e) => ({ name: e.name, bytes: ownView(e.bytes) }))
    return movable(
      { ...result, entries },
      entries.map((e) => e.bytes),
    )
  }
  const answer = await readUpload(task.name, task.source, task.options)
  if (answer.bytes) answer.bytes = ownView(answer.bytes)
  if (!answer.read.ok) return movable(answer, [answer.bytes])
  const b = answer.read.blob
  const blob = { wavelength: ownView(b.wavelength), flux: ownView(b.flux), error: b.error && ownView(b.error), mask: b.mask && ownView(b.mask) }
  return movable({ ...answer, read: { ...answer.read, blob } }, [answer.bytes, blob.wavelength, blob.flux, blob.error, blob.mask])
}
