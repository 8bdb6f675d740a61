// Instruments, candidate standards from agreed spectra, promotion and demotion, and suggestions that
// use an instrument's own standards. The spectra are real reference stars of published type
// (templates/observed-v2: MILES v9.1, Sánchez-Blázquez et al. 2006); the types the classifiers
// call here are the published ones.
import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEFAULT_GRID, gridWavelengths } from '../../shared/grid'
import { seededRandom } from '../../shared/random'
import { JobRunner } from '../../server/jobs/runner'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../../server/spectra/match/load'
import { float32ToBuffer } from '../../server/lib/binary'
import { createLogger } from '../../server/lib/logger'
import { Campaign, CampaignMember, Classification, Instrument, LibraryVersion, LibraryVersionStandard, Measurement, Spectrum, Standard, Suggestion } from '../../server/models'
import { ensureDefaultLibrary } from '../../server/services/standards.service'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { send, signedInPerson, type Person } from '../helpers/review'

let t: TestContext
let runner: JobRunner
let lead: Person
let alice: Person
let bob: Person
let observer: Person
let outsider: Person
let campaign: Campaign
let other: Campaign
let instrumentId: number
let otherInstrumentId: number

/** Shipped reference stars by template id (their published types). */
const STAR = { k0iii: 'miles-m0070', k0iiiBis: 'miles-m0244', a0v: 'miles-m0166', g8iii: 'miles-m0179' } as const
const templateOf = (id: string) => {
  const s = observedLibraryAt(DEFAULT_OBSERVED_DIR).inputs.find((i) => i.templateId === id)
  if (!s) throw new Error(`no shipped standard ${id}`)
  return s
}

/**
 * A spectrum of the instrument as processing leaves it: its measurement is the shipped star's
 * rectified flux on the library grid (at 2.5 Å), with a suggestion carrying `flags`.
 */
async function measured(templateId: string, o: { snr?: number; flags?: string[]; objectName?: string } = {}): Promise<Spectrum> {
  const star = templateOf(templateId)
  const spectrum = await Spectrum.create({
    campaignId: campaign.id,
    submittedBy: observer.user.id,
    batchId: null,
    status: 'suggested',
    statusReason: null,
    objectName: o.objectName ?? `${star.star} ${randomBytes(2).toString('hex')}`,
    raDeg: null,
    decDeg: null,
    obsDate: null,
    exposureS: null,
    instrument: 'test spectrograph',
    instrumentId,
    resolutionFwhm: 2.5,
    resolvingPower: null,
    vMag: null,
    parallaxMas: null,
    parallaxErrorMas: null,
    ebv: null,
    notes: '',
    fileName: 'star.txt',
    fileSha256: randomBytes(32).toString('hex'),
    fileSize: 100,
    format: 'text',
    hdu: null,
    pixels: 4000,
    wlMin: 3750,
    wlMax: 5600,
    dispersion: 0.5,
    snr: o.snr ?? 120,
    vacuumConverted: false,
    readInfo: '{}',
  })
  const rectified = Float32Array.from(star.rectified, (v) => (Number.isFinite(v) ? v : 0))
  const mask = Buffer.from(Uint8Array.from(star.rectified, (v) => (Number.isFinite(v) ? 0 : 1)))
  const m = await Measurement.create({
    spectrumId: spectrum.id,
    pipelineVersion: 'test',
    isCurrent: true,
    snr: o.snr ?? 120,
    rv: 0,
    rvError: 1,
    pseudoContinuum: false,
    warnings: '[]',
    ratios: '[]',
    gridStart: DEFAULT_GRID.start,
    gridStep: DEFAULT_GRID.step,
    gridLength: DEFAULT_GRID.length,
    flux: float32ToBuffer(rectified),
    continuum: float32ToBuffer(new Float32Array(DEFAULT_GRID.length).fill(1)),
    rectified: float32ToBuffer(rectified),
    mask,
    seconds: 1,
  })
  const active = (await LibraryVersion.findOne({ where: { isActive: true } }))!
  await Suggestion.create({
    spectrumId: spectrum.id,
    measurementId: m.id,
    libraryVersionId: active.id,
    pipelineVersion: 'test',
    isCurrent: true,
    spectralType: star.spectralType,
    letter: star.spectralType[0]!,
    subtype: star.typeCode % 10,
    typeCode: star.typeCode,
    luminosityClass: star.luminosityClass,
    classCode: star.classCode,
    uncertaintySubtypes: 1,
    uncertaintyClasses: 0.5,
    bestStandardId: null,
    candidates: '[]',
    votes: '[]',
    flags: JSON.stringify(o.flags ?? []),
    probabilities: '[]',
    details: JSON.stringify({ resolution: { fwhm: 2.5, source: 'given', bound: null, level: 2.5 } }),
  })
  return spectrum
}

const call = (p: Person, spectrumId: number, type: string, cls: string) => send(p.client, 'post', `/api/spectra/${spectrumId}/calls`, { spectralType: type, luminosityClass: cls, confidence: 3 })

/** Both classifiers call it the same: agreed unanimously. */
async function agreed(s: Spectrum, type: string, cls: string): Promise<void> {
  await call(alice, s.id, type, cls).expect(201)
  const res = await call(bob, s.id, type, cls).expect(201)
  expect(res.body.classification).toMatchObject({ agreement: 'exact', nCalls: 2 })
}

/** A text file of a shipped star's flux on its own grid, with noise to S/N `snr`. */
function starFile(templateId: string, snr: number, seed: number): Buffer {
  const { library } = observedLibraryAt(DEFAULT_OBSERVED_DIR)
  const s = library.standards.find((x) => x.entry.id === templateId)!
  const wl = gridWavelengths(DEFAULT_GRID)
  const random = seededRandom(seed)
  const rows = ['# wavelength (Angstrom, air) flux']
  let level = 0
  let n = 0
  for (let i = 0; i < wl.length; i++)
    if (Number.isFinite(s.flux[i]!) && wl[i]! > 4000 && wl[i]! < 5500) {
      level += s.flux[i]!
      n++
    }
  const sigma = level / n / snr
  for (let i = 0; i < wl.length; i++) {
    const f = s.flux[i]!
    if (!Number.isFinite(f) || wl[i]! < 3800 || wl[i]! > 5600) continue
    const g = Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
    rows.push(`${wl[i]!.toFixed(4)} ${(f + sigma * g).toExponential(6)}`)
  }
  return Buffer.from(rows.join('\n') + '\n')
}

beforeAll(async () => {
  t = await createTestContext()
  const base = await ensureDefaultLibrary(t.ctx.sequelize)
  // The database is shared between runs: start from the shipped version, with nothing promoted or added.
  await Standard.update({ retiredAt: new Date() }, { where: { source: 'observed', templateId: null, retiredAt: null } })
  await LibraryVersion.update({ isActive: false }, { where: {} })
  await LibraryVersion.update({ isActive: true }, { where: { id: base.id } })
  runner = new JobRunner({ sequelize: t.ctx.sequelize, logger: createLogger('silent'), threads: 1, inline: true })
  t.ctx.jobs = runner
  await runner.start()
  lead = await signedInPerson(t.app, 'lead', 'Maren Lead')
  alice = await signedInPerson(t.app, 'classifier', 'Alice Classifier')
  bob = await signedInPerson(t.app, 'classifier', 'Bob Classifier')
  observer = await signedInPerson(t.app, 'observer', 'Olga Observer')
  outsider = await signedInPerson(t.app, 'observer', 'Otto Outsider')
  campaign = await Campaign.create({ code: `I-${randomBytes(3).toString('hex')}`, name: 'Instrument fields', description: '', callsRequired: 2 })
  other = await Campaign.create({ code: `J-${randomBytes(3).toString('hex')}`, name: 'Other fields', description: '' })
  for (const p of [lead, alice, bob, observer]) await CampaignMember.create({ campaignId: campaign.id, userId: p.user.id })
  await CampaignMember.create({ campaignId: other.id, userId: outsider.user.id })
}, 120_000)
afterAll(async () => {
  await runner.stop()
  await t.close()
  await closeDatabase()
})

describe('instruments of a campaign', () => {
  it('are created and changed by a lead, with a name unique in the campaign', async () => {
    const res = await send(lead.client, 'post', '/api/instruments', {
      campaignId: campaign.id,
      name: 'Test LRS, 600 l/mm',
      resolutionFwhm: 2.5,
      wavelengthMin: 3700,
      wavelengthMax: 5700,
      candidateMinSnr: 50,
    }).expect(201)
    expect(res.body.instrument).toMatchObject({
      name: 'Test LRS, 600 l/mm',
      resolutionFwhm: 2.5,
      wavelengthRange: [3700, 5700],
      candidateMinSnr: 50,
      spectra: 0,
      standards: 0,
      campaign: { id: campaign.id },
    })
    instrumentId = res.body.instrument.id
    const again = await send(lead.client, 'post', '/api/instruments', { campaignId: campaign.id, name: 'Test LRS, 600 l/mm' }).expect(409)
    expect(again.body.error.details.fields.name).toMatch(/taken/)
    await send(alice.client, 'post', '/api/instruments', { campaignId: campaign.id, name: 'Another' }).expect(403)
    const bad = await send(lead.client, 'patch', `/api/instruments/${instrumentId}`, { wavelengthMin: 5000, wavelengthMax: 4000 }).expect(422)
    expect(bad.body.error.details.fields.wavelengthMax).toMatch(/start below/)
    const changed = await send(lead.client, 'patch', `/api/instruments/${instrumentId}`, { notes: 'long slit' }).expect(200)
    expect(changed.body.instrument).toMatchObject({ notes: 'long slit', resolutionFwhm: 2.5 })
    const o = await send(lead.client, 'post', '/api/instruments', { campaignId: other.id, name: 'Other spectrograph' }).expect(201)
    otherInstrumentId = o.body.instrument.id
  })

  it('are listed to the members of their campaign only', async () => {
    const mine = await observer.client.agent.get(`/api/instruments?campaign=${campaign.id}`).expect(200)
    expect(mine.body.instruments.map((i: { id: number }) => i.id)).toEqual([instrumentId])
    await outsider.client.agent.get(`/api/instruments?campaign=${campaign.id}`).expect(404)
    const all = await outsider.client.agent.get('/api/instruments').expect(200)
    expect(all.body.instruments.map((i: { id: number }) => i.id)).toEqual([otherInstrumentId])
    await outsider.client.agent.get(`/api/instruments/${instrumentId}`).expect(404)
  })

  it('are chosen on upload, by id or by the setup name, and an instrument of another campaign is refused', async () => {
    const upload = (fields: Record<string, string>, seed: number) => {
      let r = observer.client.agent.post('/api/spectra').set('x-csrf-token', observer.client.csrf).field('campaignId', String(campaign.id))
      for (const [k, v] of Object.entries(fields)) r = r.field(k, v)
      return r.attach('files', starFile(STAR.g8iii, 80, seed), `g8-${seed}-${Date.now()}.txt`)
    }
    const byId = await upload({ instrumentId: String(instrumentId), resolutionFwhm: '2.5' }, 1).expect(200)
    expect((await Spectrum.findByPk(byId.body.results[0].spectrumId))!.instrumentId).toBe(instrumentId)
    const byName = await upload({ instrument: 'test lrs, 600 L/MM' }, 2).expect(200)
    expect((await Spectrum.findByPk(byName.body.results[0].spectrumId))!.instrumentId).toBe(instrumentId)
    const before = await Spectrum.count()
    // Spectra are listed by instrument.
    const listed = await observer.client.agent.get(`/api/spectra?instrument=${instrumentId}`).expect(200)
    expect(listed.body.items.map((i: { id: number }) => i.id).sort()).toEqual([byId.body.results[0].spectrumId, byName.body.results[0].spectrumId].sort())
    const wrong = await upload({ instrumentId: String(otherInstrumentId) }, 3).expect(422)
    expect(wrong.body.error.details.fields.instrumentId).toMatch(/not an instrument of this campaign/)
    expect(await Spectrum.count()).toBe(before)
    await runner.idle()
  }, 120_000)
})

describe('candidates, promotion and demotion', () => {
  let k0: Spectrum
  let k0bis: Spectrum
  let a0: Spectrum
  let flagged: Spectrum
  let firstVersion: LibraryVersion

  beforeAll(async () => {
    k0 = await measured(STAR.k0iii, { snr: 150 })
    k0bis = await measured(STAR.k0iiiBis, { snr: 90 })
    a0 = await measured(STAR.a0v, { snr: 200 })
    const faint = await measured(STAR.g8iii, { snr: 20 })
    flagged = await measured(STAR.g8iii, { flags: ['poor-fit'] })
    const near = await measured(STAR.g8iii)
    await agreed(k0, 'K0', 'III')
    await agreed(k0bis, 'K0', 'III')
    await agreed(a0, 'A0', 'V')
    await agreed(faint, 'G8', 'III')
    await agreed(flagged, 'G8', 'III')
    // Agreed within the tolerance, not unanimously.
    await call(alice, near.id, 'G8', 'III').expect(201)
    await call(bob, near.id, 'G9', 'III').expect(201)
    firstVersion = (await LibraryVersion.findOne({ where: { isActive: true } }))!
  }, 120_000)

  it('lists decided spectra that fill a gap, the best of each cell first, and says why the others are not proposed', async () => {
    const res = await alice.client.agent.get(`/api/instruments/${instrumentId}/candidates`).expect(200)
    const list = res.body.candidates as { spectrumId: number; cell: { label: string }; firstInCell: boolean; decision: { how: string; calls: { classifier: { name: string } }[] } }[]
    expect(list.map((c) => [c.spectrumId, c.cell.label, c.firstInCell])).toEqual([
      [a0.id, 'A0 V', true],
      [k0.id, 'K0 III', true],
      [k0bis.id, 'K0 III', false],
    ])
    expect(list[0]!.decision.how).toBe('agreed')
    expect(list[0]!.decision.calls.map((c) => c.classifier.name).sort()).toEqual(['Alice Classifier', 'Bob Classifier'])
    const reasons = Object.fromEntries((res.body.passedOver as { reason: string; count: number }[]).map((p) => [p.reason, p.count]))
    expect(reasons['S/N below 50']).toBe(1)
    expect(reasons['with quality flags on their suggestion']).toBe(1)
    expect(reasons['not agreed unanimously by two or more classifiers, nor settled']).toBe(1)
    expect(res.body.coverage).toEqual([])
  })

  it('are not promoted by a classifier, nor two for one gap, nor a spectrum that is no candidate', async () => {
    await send(alice.client, 'post', `/api/instruments/${instrumentId}/promote`, { spectrumIds: [a0.id] }).expect(403)
    const same = await send(lead.client, 'post', `/api/instruments/${instrumentId}/promote`, { spectrumIds: [k0.id, k0bis.id] }).expect(409)
    expect(same.body.error.code).toBe('same_gap')
    const no = await send(lead.client, 'post', `/api/instruments/${instrumentId}/promote`, { spectrumIds: [flagged.id] }).expect(409)
    expect(no.body.error.code).toBe('not_a_candidate')
    expect((await LibraryVersion.findOne({ where: { isActive: true } }))!.id).toBe(firstVersion.id)
  })

  it('publishes a new active version with the promoted spectra and their provenance', async () => {
    const res = await send(lead.client, 'post', `/api/instruments/${instrumentId}/promote`, { spectrumIds: [a0.id, k0.id], note: 'first two' }).expect(201)
    const v = res.body.version
    expect(v).toMatchObject({ isActive: true, instrumentId, basedOnId: firstVersion.id, publishedBy: lead.user.id })
    expect(v.changes.action).toBe('promote')
    expect(v.changes.note).toBe('first two')
    expect(v.changes.standards.map((s: { spectrumId: number }) => s.spectrumId).sort()).toEqual([a0.id, k0.id].sort())
    expect(v.changes.standards[0].reason).toMatch(/agreed unanimously by (Alice Classifier and Bob Classifier|Bob Classifier and Alice Classifier) as /)

    const before = (await LibraryVersionStandard.findAll({ where: { versionId: firstVersion.id } })).map((l) => l.standardId)
    const after = (await LibraryVersionStandard.findAll({ where: { versionId: v.id } })).map((l) => l.standardId)
    const promoted = await Standard.findAll({ where: { instrumentId, spectrumId: [a0.id, k0.id] } })
    expect(promoted).toHaveLength(2)
    expect(after.sort((a, b) => a - b)).toEqual([...before, ...promoted.map((s) => s.id)].sort((a, b) => a - b))
    expect(await LibraryVersion.count({ where: { isActive: true } })).toBe(1)

    const k0std = promoted.find((s) => s.spectrumId === k0.id)!
    expect(k0std).toMatchObject({ spectralType: 'K0 III', typeCode: 50, classCode: 4, source: 'observed', resolutionFwhm: 2.5, addedBy: lead.user.id, retiredAt: null })
    expect(k0std.rectified!.length).toBe(DEFAULT_GRID.length * 4)
    const provenance = JSON.parse(k0std.provenance!)
    expect(provenance).toMatchObject({ spectrumId: k0.id, snr: 150, gap: 'K0 III', instrument: { id: instrumentId }, promotedBy: { id: lead.user.id, name: 'Maren Lead' } })
    expect(provenance.decision).toMatchObject({ how: 'agreed', spectralType: 'K0 III' })
    expect(provenance.decision.calls).toHaveLength(2)
    expect(Date.parse(provenance.decision.decidedAt)).not.toBeNaN()

    // The library lists them with the instrument and their provenance.
    const lib = await alice.client.agent.get('/api/standards').expect(200)
    const listed = lib.body.standards.find((s: { id: number }) => s.id === k0std.id)
    expect(listed).toMatchObject({ instrumentId, versionIds: [v.id], provenance: { gap: 'K0 III' } })
  })

  it('then shows the filled cells as coverage and proposes no second spectrum for a filled cell', async () => {
    const res = await lead.client.agent.get(`/api/instruments/${instrumentId}/candidates`).expect(200)
    expect(res.body.coverage.map((c: { label: string }) => c.label)).toEqual(['A0 V', 'K0 III'])
    expect(res.body.candidates).toEqual([])
    const reasons = Object.fromEntries((res.body.passedOver as { reason: string; count: number }[]).map((p) => [p.reason, p.count]))
    expect(reasons['already a standard']).toBe(2)
    expect(reasons['in a type and class already covered']).toBe(1)
    const listed = await lead.client.agent.get(`/api/instruments/${instrumentId}`).expect(200)
    expect(listed.body.instrument.standards).toBe(2)
  })

  it('demotes a standard into a new version without it, saying why; earlier versions keep it', async () => {
    const k0std = (await Standard.findOne({ where: { instrumentId, spectrumId: k0.id } }))!
    const promotedVersion = (await LibraryVersion.findOne({ where: { isActive: true } }))!
    await send(alice.client, 'post', `/api/instruments/${instrumentId}/demote`, { standardIds: [k0std.id], note: 'x' }).expect(403)
    await send(lead.client, 'post', `/api/instruments/${instrumentId}/demote`, { standardIds: [k0std.id] }).expect(422)
    const res = await send(lead.client, 'post', `/api/instruments/${instrumentId}/demote`, { standardIds: [k0std.id], note: 'a companion shows in the red' }).expect(201)
    expect(res.body.version).toMatchObject({
      isActive: true,
      instrumentId,
      basedOnId: promotedVersion.id,
      changes: { action: 'demote', note: 'a companion shows in the red', standards: [{ standardId: k0std.id, spectrumId: k0.id, reason: 'a companion shows in the red' }] },
    })
    const members = (await LibraryVersionStandard.findAll({ where: { versionId: res.body.version.id } })).map((l) => l.standardId)
    expect(members).not.toContain(k0std.id)
    expect((await LibraryVersionStandard.findAll({ where: { versionId: promotedVersion.id } })).map((l) => l.standardId)).toContain(k0std.id)
    expect((await Standard.findByPk(k0std.id))!.retiredAt).not.toBeNull()
    const again = await send(lead.client, 'post', `/api/instruments/${instrumentId}/demote`, { standardIds: [k0std.id], note: 'again' }).expect(409)
    expect(again.body.error.code).toBe('not_a_standard')
    // A demoted spectrum is not proposed again.
    const c = await lead.client.agent.get(`/api/instruments/${instrumentId}/candidates`).expect(200)
    expect(c.body.candidates.map((x: { spectrumId: number }) => x.spectrumId)).toEqual([k0bis.id])
  })
})

describe('the agreement audit', () => {
  it("scores the instrument's suggestions against the decisions, per library version", async () => {
    // One suggestion says a quarter of its type vote came from the instrument's own standards; the rest say nothing.
    const ofInstrument = await Spectrum.findAll({ where: { instrumentId }, attributes: ['id'], order: [['id', 'ASC']] })
    const decided = (await Classification.findOne({ where: { spectrumId: ofInstrument.map((x) => x.id) }, order: [['id', 'ASC']] }))!
    const first = (await Suggestion.findOne({ where: { spectrumId: decided.spectrumId }, order: [['id', 'DESC']] }))!
    await first.update({ details: JSON.stringify({ ...JSON.parse(first.details!), standards: { instrumentShare: { type: 0.25, class: 0.1 } } }) })
    const res = await lead.client.agent.get(`/api/audit?campaign=${campaign.id}`).expect(200)
    const mine = (
      res.body.audit.suggestionAccuracy.instruments as { instrument: { id: number }; versions: { version: { name: string }; n: number; ownShare: { value: number | null; n: number } }[] }[]
    ).find((i) => i.instrument.id === instrumentId)!
    // The six decided spectra were suggested by the shipped version; none of them is one of its standards.
    expect(mine.versions.map((v) => [v.version.name, v.n])).toEqual([['observed-v2', 6]])
    expect(mine.versions[0]!.ownShare).toMatchObject({ value: 0.25, n: 1 })
  })
})

describe('suggestions for spectra of an instrument with its own standards', () => {
  it('record the instrument set they were matched against and which standards decided them', async () => {
    // The promoted A0 V is still in the active version: a spectrum of the same star through the instrument finds it.
    const res = await observer.client.agent
      .post('/api/spectra')
      .set('x-csrf-token', observer.client.csrf)
      .field('campaignId', String(campaign.id))
      .field('instrumentId', String(instrumentId))
      .field('resolutionFwhm', '2.5')
      .attach('files', starFile(STAR.a0v, 100, 11), `a0v-${Date.now()}.txt`)
      .expect(200)
    const id = res.body.results[0].spectrumId as number
    await runner.idle()
    const s = (await Suggestion.findOne({ where: { spectrumId: id, isCurrent: true } }))!
    expect(s.instrumentId).toBe(instrumentId)
    const details = JSON.parse(s.details!)
    expect(details.standards).toMatchObject({ instrument: { id: instrumentId, name: 'Test LRS, 600 l/mm' }, instrumentStandards: 1 })
    expect(details.standards.instrumentShare.type).toBeGreaterThan(0)
    const own = (await Standard.findOne({ where: { instrumentId, retiredAt: null } }))!
    expect(details.standards.deciding.some((d: { standardId: number; set: string }) => d.standardId === own.id && d.set === 'instrument')).toBe(true)
    expect(Math.abs(s.typeCode - 20)).toBeLessThanOrEqual(1)
    // The API gives it with the suggestion.
    const page = await lead.client.agent.get(`/api/spectra/${id}`).expect(200)
    expect(page.body.suggestions.current.instrumentId).toBe(instrumentId)
    expect(page.body.spectrum.instrumentRecord).toMatchObject({ id: instrumentId, name: 'Test LRS, 600 l/mm' })
  }, 120_000)

  it('of no instrument, use the library alone and say so', async () => {
    const res = await observer.client.agent
      .post('/api/spectra')
      .set('x-csrf-token', observer.client.csrf)
      .field('campaignId', String(campaign.id))
      .field('resolutionFwhm', '2.5')
      .attach('files', starFile(STAR.a0v, 100, 12), `a0v-none-${Date.now()}.txt`)
      .expect(200)
    const id = res.body.results[0].spectrumId as number
    await runner.idle()
    const s = (await Suggestion.findOne({ where: { spectrumId: id, isCurrent: true } }))!
    expect(s.instrumentId).toBeNull()
    const details = JSON.parse(s.details!)
    expect(details.standards).toMatchObject({ instrument: null, instrumentStandards: 0, decidedBy: 'library', instrumentShare: { type: 0, class: 0 } })
    expect(details.standards.deciding.every((d: { set: string }) => d.set === 'library')).toBe(true)
  }, 120_000)

  it('move to another instrument by a correction, which processes the spectrum again', async () => {
    const s = (await Spectrum.findOne({ where: { campaignId: campaign.id, instrumentId: null }, order: [['id', 'DESC']] }))!
    const res = await send(observer.client, 'patch', `/api/spectra/${s.id}`, { instrumentId }).expect(200)
    expect(res.body.spectrum.instrumentRecord).toMatchObject({ id: instrumentId })
    await runner.idle()
    const current = (await Suggestion.findOne({ where: { spectrumId: s.id, isCurrent: true } }))!
    expect(current.instrumentId).toBe(instrumentId)
    await send(observer.client, 'patch', `/api/spectra/${s.id}`, { instrumentId: otherInstrumentId }).expect(422)
    expect((await Instrument.findByPk(instrumentId))!.campaignId).toBe(campaign.id)
  }, 120_000)
})
