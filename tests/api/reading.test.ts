import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { QueryTypes } from 'sequelize'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadCorpus } from '../../bench/corpus'
import { JobRunner } from '../../server/jobs/runner'
import { createLogger } from '../../server/lib/logger'
import { Campaign, CampaignMember, Measurement, ProcessingJob, ReviewCall, Spectrum, SpectrumBlob, SpectrumEvent, Suggestion } from '../../server/models'
import { activeVersionId, ensureDefaultLibrary, librarySpecFor } from '../../server/services/standards.service'
import { indexSuggestionFlags } from '../../server/services/suggestions.service'
import runTask, { shareLibrarySpec } from '../../server/jobs/worker'
import { readSpectrum, toSpectrum1D } from '../../server/spectra/io'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'

// Files of the reader corpus (tests/reference/make_reader_corpus.py): the known spectrum F5 V, whose
// air range and medium corpus.json states, so a right read is known without asking the code.
const CORPUS = join(process.cwd(), 'tests', 'fixtures', 'corpus')
const corpus = loadCorpus()
const expected = (file: string) => corpus.files.find((e) => e.file === file)!
// Every run needs bytes not seen before (uploads are deduplicated by hash): a trailing comment line does it.
const unique = (bytes: Buffer) => Buffer.concat([bytes, Buffer.from(`\n# run ${Date.now()} ${Math.random()}\n`)])
const fitsUnique = (bytes: Buffer) => {
  // FITS: change the OBJECT card's value in place (same length), so the data are untouched.
  const text = bytes.toString('latin1')
  const at = text.indexOf("OBJECT  = 'SYNTH-F5V'")
  const out = Buffer.from(bytes)
  out.write(`OBJECT  = '${Math.random().toString(36).slice(2, 11).padEnd(9, 'x')}'`, at, 'latin1')
  return out
}

let t: TestContext
let runner: JobRunner
let campaign: Campaign
type Client = Awaited<ReturnType<typeof signedInAgent>>
let observer: Client
let otherObserver: Client
let lead: Client
let observerId: number

beforeAll(async () => {
  t = await createTestContext()
  await ensureDefaultLibrary(t.ctx.sequelize)
  // Spectra are processed on this thread, and the first one prepares the library's level (tens of
  // seconds of CPU on a busy machine): done here, so it never lands inside a test's own time.
  const warm = readSpectrum(readFileSync(join(CORPUS, 'txt-plain.txt')), 'txt-plain.txt')
  if (!warm.ok) throw new Error(warm.message)
  runTask({ spectrum: toSpectrum1D(warm.spectrum), library: shareLibrarySpec(await librarySpecFor((await activeVersionId())!)) })
  runner = new JobRunner({ sequelize: t.ctx.sequelize, logger: createLogger('silent'), threads: 1, inline: true })
  t.ctx.jobs = runner
  await runner.start()
  campaign = await Campaign.create({ code: `R-${Date.now()}`, name: 'Reading', description: '' })
  const o = await makeUser('observer')
  observerId = o.user.id
  await CampaignMember.create({ campaignId: campaign.id, userId: o.user.id })
  observer = await signedInAgent(t.app, o.user.email, o.password)
  const o2 = await makeUser('observer')
  await CampaignMember.create({ campaignId: campaign.id, userId: o2.user.id })
  otherObserver = await signedInAgent(t.app, o2.user.email, o2.password)
  const l = await makeUser('lead')
  lead = await signedInAgent(t.app, l.user.email, l.password)
}, 120_000)
afterAll(async () => {
  await runner.stop()
  await t.close()
  await closeDatabase()
})

async function submit(bytes: Buffer, name: string, fields: Record<string, string> = {}) {
  let req = observer.agent.post('/api/spectra').set('x-csrf-token', observer.csrf).field('campaignId', String(campaign.id))
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v)
  const res = await req.attach('files', bytes, name).expect(200)
  return res.body.results[0]
}
const patch = (client: Client, id: number, body: object) => client.agent.patch(`/api/spectra/${id}`).set('x-csrf-token', client.csrf).send(body)
const remove = (client: Client, id: number) => client.agent.delete(`/api/spectra/${id}`).set('x-csrf-token', client.csrf)

describe('POST /api/spectra with reading choices', () => {
  it("returns the reader's decisions with each accepted file", async () => {
    const e = expected('two-arm-images.fits')
    const r = await submit(fitsUnique(readFileSync(join(CORPUS, e.file))), e.file)
    expect(r.outcome).toBe('accepted')
    expect(r.decisions.hdu).toEqual({ index: 2, name: 'BLUE', why: 'the first HDU that covers the classification region (HDU 1 (RED) does not)' })
    expect(r.decisions.ignored).toEqual(['HDU 1 (RED): another spectrum (5600–6959 Å); pick it with the HDU option'])
    expect(r.decisions.medium).toEqual({ vacuum: false, why: "CTYPE1 = 'AWAV' (air, FITS WCS Paper III)" })
    expect(r.wavelengthRange[0]).toBeCloseTo(e.airRange![0], 1)
  })
  it('reads the aperture and the unit the observer names', async () => {
    const ms = expected('ms-2ap-pick.fits')
    const r = await submit(fitsUnique(readFileSync(join(CORPUS, ms.file))), ms.file, { aperture: '2' })
    expect(r.decisions.aperture.number).toBe(2)
    expect(r.wavelengthRange[0]).toBeCloseTo(ms.airRange![0], 1)
    const nm = await submit(unique(readFileSync(join(CORPUS, 'refuse-nm-no-unit.txt'))), 'in-nm.txt', { wavelengthUnit: 'nm' })
    expect(nm.outcome).toBe('accepted')
    expect(nm.wavelengthRange[0]).toBeCloseTo(3800, 6)
    expect(nm.decisions.unit).toEqual({ unit: 'nm', why: 'your choice' })
    const s = await Spectrum.findByPk(nm.spectrumId)
    expect(JSON.parse(s!.readChoices)).toEqual({ unit: 'nm' })
  })
  it('refuses an unknown unit choice before reading anything', async () => {
    const res = await observer.agent
      .post('/api/spectra')
      .set('x-csrf-token', observer.csrf)
      .field('campaignId', String(campaign.id))
      .field('wavelengthUnit', 'furlong')
      .attach('files', unique(readFileSync(join(CORPUS, 'txt-plain.txt'))), 'x.txt')
      .expect(422)
    expect(res.body.error.details.fields.wavelengthUnit).toMatch(/must be one of file, Angstrom, nm, um, m/)
  })
})

describe('PATCH /api/spectra/:id: correcting how the file is read', () => {
  // A vacuum file that says nothing about its medium: read as air it is off by the air–vacuum
  // difference (about 84 km/s); told "vacuum" it is read right. Truth: corpus.json for txt-wave-vac.txt.
  const truth = expected('txt-wave-vac.txt')
  const silentVacuum = () => unique(Buffer.from(readFileSync(join(CORPUS, truth.file), 'utf8').replace(/^wave_vac flux\n/, '')))

  it('re-reads the stored file, re-processes, and keeps the old result in the history', async () => {
    const first = await submit(silentVacuum(), 'silent-vacuum.txt')
    expect(first.decisions.medium.why).toMatch(/air assumed/)
    await runner.idle()
    const before = await Measurement.findOne({ where: { spectrumId: first.spectrumId, isCurrent: true } })
    // Velocities are measured against real standards, each at rest only to about ±10 km/s, and this
    // test spectrum is a model star: ±25 km/s still tells a right read from the 84 km/s of air read as vacuum.
    expect(Math.abs(before!.rv! - 84)).toBeLessThan(25)
    const oldSuggestion = await Suggestion.findOne({ where: { spectrumId: first.spectrumId, isCurrent: true } })
    expect(oldSuggestion).not.toBeNull()

    // The queue filters by the current suggestion's flags; the retired suggestion's must not linger.
    // Any runner of the shared test database may already be processing the spectrum again, so the
    // flag rows, the stored count and the current suggestion (if any yet) are read in one statement.
    await indexSuggestionFlags(t.ctx.sequelize, first.spectrumId, ['emission'])
    const res = await patch(observer, first.spectrumId, { wavelengthMedium: 'vacuum' }).expect(200)
    const [flagState] = await t.ctx.sequelize.query<{ flagCount: number; rows: string | null; current: string | null }>(
      `SELECT s.flag_count AS flagCount, (SELECT GROUP_CONCAT(f.flag ORDER BY f.flag) FROM spectrum_flags f WHERE f.spectrum_id = s.id) AS \`rows\`,
              (SELECT g.flags FROM suggestions g WHERE g.spectrum_id = s.id AND g.is_current = 1) AS current
       FROM spectra s WHERE s.id = :id`,
      { replacements: { id: first.spectrumId }, type: QueryTypes.SELECT },
    )
    const current = flagState!.current
    const currentFlags = current === null ? [] : [...new Set((typeof current === 'string' ? JSON.parse(current) : current) as string[])].sort()
    expect(flagState!.rows === null ? [] : flagState!.rows.split(',').sort()).toEqual(currentFlags)
    expect(Number(flagState!.flagCount)).toBe(currentFlags.length)
    // The model F5 V star shows no emission: the flag set by hand above belonged to the retired suggestion alone.
    expect(currentFlags).not.toContain('emission')
    expect(res.body.spectrum.readChoices).toEqual({ medium: 'vacuum' })
    expect(res.body.spectrum.read.decisions.medium).toEqual({ vacuum: true, why: 'your choice (vacuum)' })
    expect(res.body.spectrum.wavelengthRange[0]).toBeCloseTo(truth.airRange![0], 2)
    expect(res.body.spectrum.wavelengthRange[1]).toBeCloseTo(truth.airRange![1], 2)
    expect(res.body.spectrum.status).toBe('received')
    await runner.idle()

    const all = await Measurement.findAll({ where: { spectrumId: first.spectrumId }, order: [['id', 'ASC']] })
    expect(all).toHaveLength(2)
    expect(all.map((m) => m.isCurrent)).toEqual([false, true])
    expect(Math.abs(all[1]!.rv!)).toBeLessThan(25)
    expect(await Suggestion.count({ where: { spectrumId: first.spectrumId } })).toBe(2)
    const events = await SpectrumEvent.findAll({ where: { spectrumId: first.spectrumId } })
    expect(events.map((e) => e.kind)).toEqual(['reread'])
    const details = JSON.parse(events[0]!.details)
    expect(details.before).toMatchObject({ choices: {}, vacuumConverted: false, measurementId: before!.id, suggestionId: oldSuggestion!.id })
    expect(details.after).toMatchObject({ choices: { medium: 'vacuum' }, vacuumConverted: true })
    // The uploaded file itself is kept as it came.
    const blob = await SpectrumBlob.findByPk(first.spectrumId)
    expect((await t.ctx.files.get(blob!.rawKey!)).toString('utf8').startsWith('3800.')).toBe(false)
    const history = await observer.agent.get(`/api/spectra/${first.spectrumId}/history`).expect(200)
    const kinds = history.body.events.map((e: { kind: string }) => e.kind)
    expect(kinds.filter((k: string) => k === 'measurement')).toHaveLength(2)
    expect(history.body.events.find((e: { kind: string }) => e.kind === 'reread').summary).toMatch(
      /^Read again as vacuum, unit Angstrom \(assumed\): 3800\.0–5299\.0 Å, 1500 pixels \(was 3801\.1–5300\.5 Å, 1500 pixels\)$/,
    )
  }, 60_000)

  it('re-processes with a corrected resolution without re-reading', async () => {
    const r = await submit(unique(readFileSync(join(CORPUS, 'txt-plain.txt'))), 'resolution.txt')
    await runner.idle()
    await patch(observer, r.spectrumId, { resolutionFwhm: 2.5 }).expect(200)
    await runner.idle()
    const events = await SpectrumEvent.findAll({ where: { spectrumId: r.spectrumId } })
    expect(events.map((e) => [e.kind, e.summary])).toEqual([['reprocess', 'Processed again with resolution 2.5 Å FWHM (was none given)']])
    expect(await Measurement.count({ where: { spectrumId: r.spectrumId } })).toBe(2)
  }, 60_000)

  it('refuses choices the file cannot be read with, and changes nothing', async () => {
    const r = await submit(fitsUnique(readFileSync(join(CORPUS, 'ms-2ap-default.fits'))), 'two-apertures.fits')
    const res = await patch(observer, r.spectrumId, { aperture: 3 }).expect(422)
    expect(res.body.error).toMatchObject({ code: 'read_refused', details: { code: 'APERTURE_NOT_FOUND' } })
    expect(res.body.error.message).toMatch(/there is no aperture 3.*Nothing was changed\.$/)
    const s = await Spectrum.findByPk(r.spectrumId)
    expect(JSON.parse(s!.readChoices)).toEqual({})
    expect(await SpectrumEvent.count({ where: { spectrumId: r.spectrumId } })).toBe(0)
    // null goes back to "as the file says".
    await patch(observer, r.spectrumId, { aperture: 2 }).expect(200)
    const back = await patch(observer, r.spectrumId, { aperture: null }).expect(200)
    expect(back.body.spectrum.readChoices).toEqual({})
    expect(back.body.spectrum.read.decisions.aperture.number).toBe(1)
  })

  it('leaves reading choices to a lead once a classifier has called the spectrum', async () => {
    const r = await submit(unique(readFileSync(join(CORPUS, 'txt-plain.txt'))), 'called.txt')
    await runner.idle()
    await addCall(r.spectrumId)
    const res = await patch(observer, r.spectrumId, { wavelengthMedium: 'vacuum' }).expect(409)
    expect(res.body.error.code).toBe('has_calls')
    await patch(observer, r.spectrumId, { objectName: 'KR-0412' }).expect(200)
    const byLead = await patch(lead, r.spectrumId, { wavelengthMedium: 'vacuum' }).expect(200)
    expect(byLead.body.spectrum.readChoices).toEqual({ medium: 'vacuum' })
    await runner.idle()
  }, 60_000)
})

async function addCall(spectrumId: number) {
  const c = await makeUser('classifier')
  await ReviewCall.create({
    spectrumId,
    userId: c.user.id,
    kind: 'call',
    firstCall: 1,
    correctsCallId: null,
    spectralType: 'F5 V',
    letter: 'F',
    subtype: 5,
    typeCode: 35,
    luminosityClass: 'V',
    classCode: 5,
    peculiarities: '[]',
    notes: '',
    confidence: 2,
    uncertain: false,
    acceptedSuggestion: false,
    suggestionId: null,
    suggestionShown: false,
    secondsSpent: 30,
  })
}

describe("DELETE /api/spectra/:id: withdrawing one's own spectrum", () => {
  it('removes the file and every row, keeps a record, and lets the file be sent again', async () => {
    const bytes = unique(readFileSync(join(CORPUS, 'txt-plain.txt')))
    const r = await submit(bytes, 'withdraw-me.txt')
    await runner.idle()
    expect(await Measurement.count({ where: { spectrumId: r.spectrumId } })).toBe(1)
    const { rawKey } = (await SpectrumBlob.findByPk(r.spectrumId))!
    expect(await t.ctx.files.exists(rawKey!)).toBe(true)
    await remove(otherObserver, r.spectrumId).expect(404)
    await remove(lead, r.spectrumId).expect(403)
    const res = await remove(observer, r.spectrumId).expect(200)
    expect(res.body.message).toBe('withdraw-me.txt was withdrawn; its file and results are gone.')
    expect(await Spectrum.findByPk(r.spectrumId)).toBeNull()
    expect(await SpectrumBlob.findByPk(r.spectrumId)).toBeNull()
    expect(await t.ctx.files.exists(rawKey!)).toBe(false)
    expect(await Measurement.count({ where: { spectrumId: r.spectrumId } })).toBe(0)
    expect(await Suggestion.count({ where: { spectrumId: r.spectrumId } })).toBe(0)
    expect(await ProcessingJob.count({ where: { spectrumId: r.spectrumId } })).toBe(0)
    const record = await SpectrumEvent.findOne({ where: { spectrumId: r.spectrumId, kind: 'withdrawn' } })
    expect(record).toMatchObject({ userId: observerId, campaignId: campaign.id, summary: expect.stringMatching(/withdrew withdraw-me\.txt \(withdraw-me\) before any call$/) })
    expect(JSON.parse(record!.details)).toMatchObject({ fileName: 'withdraw-me.txt', pixels: 1500 })
    await observer.agent.get(`/api/spectra/${r.spectrumId}`).expect(404)
    const again = await submit(bytes, 'withdraw-me.txt')
    expect(again.outcome).toBe('accepted')
    await runner.idle()
  }, 60_000)

  it('refuses while the spectrum is being measured, and says to try again in a moment', async () => {
    const r = await submit(unique(readFileSync(join(CORPUS, 'txt-plain.txt'))), 'busy.txt')
    await runner.idle()
    // As a re-measurement in progress leaves it: a job some runner holds.
    const job = await ProcessingJob.create({ spectrumId: r.spectrumId, status: 'running', error: null, requestedBy: null, startedAt: new Date(), finishedAt: null })
    const res = await remove(observer, r.spectrumId).expect(409)
    expect(res.body.error).toMatchObject({ code: 'processing', message: expect.stringMatching(/withdraw it again in a moment/) })
    expect(await Spectrum.findByPk(r.spectrumId)).not.toBeNull()
    await job.update({ status: 'done', finishedAt: new Date() })
    await remove(observer, r.spectrumId).expect(200)
  }, 60_000)

  it('refuses once a classifier has called it', async () => {
    const r = await submit(unique(readFileSync(join(CORPUS, 'txt-plain.txt'))), 'keep-me.txt')
    await runner.idle()
    await addCall(r.spectrumId)
    const detail = await observer.agent.get(`/api/spectra/${r.spectrumId}`).expect(200)
    expect(detail.body.spectrum).toMatchObject({ canWithdraw: false, canReread: false, canEdit: true })
    const res = await remove(observer, r.spectrumId).expect(409)
    expect(res.body.error.code).toBe('has_calls')
    expect(await Spectrum.findByPk(r.spectrumId)).not.toBeNull()
  }, 60_000)
})
