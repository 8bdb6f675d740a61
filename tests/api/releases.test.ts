import { spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { unzipSync } from 'fflate'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Classification, LibraryVersion, Measurement, Release, ReleaseRow, ReviewCall, Spectrum, Suggestion, type User } from '../../server/models'
import { DERIVED_CAUTION } from '../../server/services/derived.service'
import { deriveParameters } from '../../shared/derived'
import { parseMK } from '../../shared/mk'
import { agentFor, closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'

type Client = Awaited<ReturnType<typeof signedInAgent>>
let t: TestContext
let campaign: Campaign
let empty: Campaign
let lead: Client
let observer: Client
let otherObserver: Client
let leadUser: User
let observerUser: User
let callers: User[]
let version: LibraryVersion
const spectra: Record<string, Spectrum> = {}

async function makeSpectrum(name: string, status: Spectrum['status'], extra: Partial<Spectrum> = {}) {
  return Spectrum.create({
    campaignId: campaign.id,
    submittedBy: observerUser.id,
    batchId: null,
    status,
    statusReason: null,
    objectName: name,
    raDeg: 150.25,
    decDeg: -12.5,
    obsDate: new Date('2025-01-05T03:04:05.600Z'),
    exposureS: null,
    instrument: '',
    resolutionFwhm: null,
    resolvingPower: null,
    vMag: null,
    parallaxMas: null,
    parallaxErrorMas: null,
    ebv: null,
    notes: '',
    fileName: 'x.txt',
    fileSha256: randomBytes(32).toString('hex'),
    fileSize: 1,
    format: 'text',
    hdu: null,
    pixels: 1,
    wlMin: 3800,
    wlMax: 5000,
    dispersion: 1,
    snr: 40,
    vacuumConverted: false,
    readInfo: '{}',
    ...extra,
  })
}

async function suggest(s: Spectrum, type: string, letter: string, subtype: number, typeCode: number, cls: string, classCode: number) {
  const m = await Measurement.create({
    spectrumId: s.id,
    pipelineVersion: '1.0.0',
    isCurrent: true,
    snr: 55.5,
    rv: -21.5,
    rvError: 4.2,
    pseudoContinuum: false,
    warnings: '[]',
    ratios: '[]',
    gridStart: 3800,
    gridStep: 1,
    gridLength: 0,
    flux: Buffer.alloc(0),
    continuum: Buffer.alloc(0),
    rectified: Buffer.alloc(0),
    mask: Buffer.alloc(0),
    seconds: 0,
  })
  return Suggestion.create({
    spectrumId: s.id,
    measurementId: m.id,
    libraryVersionId: version.id,
    pipelineVersion: '1.0.0',
    isCurrent: true,
    spectralType: type,
    letter,
    subtype,
    typeCode,
    luminosityClass: cls,
    classCode,
    uncertaintySubtypes: 1.5,
    uncertaintyClasses: 0.7,
    bestStandardId: null,
    candidates: '[]',
    votes: '[]',
    flags: '[]',
    probabilities: '[]',
  })
}

async function callOn(s: Spectrum, user: User, typeCode: number, classCode: number) {
  return ReviewCall.create({
    spectrumId: s.id,
    userId: user.id,
    kind: 'call',
    firstCall: 1,
    correctsCallId: null,
    spectralType: '',
    letter: '',
    subtype: 0,
    typeCode,
    luminosityClass: '',
    classCode,
    peculiarities: '[]',
    notes: '',
    confidence: 3,
    uncertain: false,
    acceptedSuggestion: false,
    suggestionId: null,
    suggestionShown: false,
    secondsSpent: 30,
  })
}

async function decide(s: Spectrum, fields: Partial<Classification> & Pick<Classification, 'source' | 'spectralType' | 'typeCode' | 'luminosityClass' | 'classCode'>) {
  return Classification.create({
    spectrumId: s.id,
    letter: fields.spectralType.slice(0, 1),
    subtype: 0,
    peculiarities: '[]',
    decidedBy: null,
    nCalls: 1,
    callIds: '[]',
    agreement: 'exact',
    typeSpread: 0,
    classSpread: 0,
    suggestionId: null,
    disputeId: null,
    note: '',
    ...fields,
  })
}

beforeAll(async () => {
  t = await createTestContext()
  const tag = randomBytes(3).toString('hex')
  campaign = await Campaign.create({ code: `RL-${tag}`, name: 'Release fields', description: '' })
  empty = await Campaign.create({ code: `RE-${tag}`, name: 'Nothing decided', description: '' })
  const l = await makeUser('lead', { name: 'Release Lead' })
  leadUser = l.user
  lead = await signedInAgent(t.app, l.user.email, l.password)
  const o = await makeUser('observer')
  observerUser = o.user
  observer = await signedInAgent(t.app, o.user.email, o.password)
  await CampaignMember.create({ campaignId: campaign.id, userId: o.user.id })
  const o2 = await makeUser('observer')
  otherObserver = await signedInAgent(t.app, o2.user.email, o2.password)
  callers = [(await makeUser('classifier', { name: 'Caller One' })).user, (await makeUser('classifier', { name: 'Caller Two' })).user]
  version = await LibraryVersion.create({ name: `rel-${tag}`, description: '', publishedAt: null, publishedBy: null })

  // A consensus of two calls, with V, E(B−V) and a parallax.
  spectra.consensus = await makeSpectrum('Field star, "north" 1', 'agreed', { vMag: 8.5, ebv: 0.1, parallaxMas: 2.5, parallaxErrorMas: 0.1 })
  const s1 = await suggest(spectra.consensus, 'B8 III', 'B', 8, 18, 'III', 4)
  const c1 = await callOn(spectra.consensus, callers[0]!, 18, 4)
  const c2 = await callOn(spectra.consensus, callers[1]!, 19, 4)
  await decide(spectra.consensus, {
    source: 'consensus',
    spectralType: 'B8 III',
    typeCode: 18,
    luminosityClass: 'III',
    classCode: 4,
    nCalls: 2,
    callIds: JSON.stringify([c1.id, c2.id]),
    agreement: 'within',
    typeSpread: 1,
    classSpread: 0,
    suggestionId: s1.id,
    decidedBy: callers[1]!.id,
  })
  // Settled by the lead.
  spectra.settled = await makeSpectrum('Field star 2', 'settled')
  await suggest(spectra.settled, 'G2 V', 'G', 2, 42, 'V', 6)
  await decide(spectra.settled, {
    source: 'settled',
    spectralType: 'G5 IV',
    typeCode: 45,
    luminosityClass: 'IV',
    classCode: 5,
    nCalls: 2,
    agreement: 'settled',
    decidedBy: leadUser.id,
    peculiarities: JSON.stringify(['e']),
  })
  // The suggestion accepted; a white dwarf, outside the MK grid.
  spectra.accepted = await makeSpectrum('Faint blue star 3', 'agreed')
  await decide(spectra.accepted, { source: 'accepted-suggestion', spectralType: 'DA3', typeCode: 0, luminosityClass: '', classCode: 0, nCalls: 1 })
  // Still under review: not released.
  spectra.waiting = await makeSpectrum('Field star 4', 'under_review')
  await suggest(spectra.waiting, 'K0 III', 'K', 0, 50, 'III', 4)
  // Only a suggestion, for the derived-parameters route.
  spectra.suggested = await makeSpectrum('Field star 5', 'suggested', { vMag: 10 })
  await suggest(spectra.suggested, 'A0 V', 'A', 0, 20, 'V', 6)
  spectra.bare = await makeSpectrum('Field star 6', 'received')
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const post = (client: Client, path: string, body: object) => client.agent.post(path).set('x-csrf-token', client.csrf).send(body)
const download = (client: Client, id: number, format: string) =>
  client.agent
    .get(`/api/releases/${id}/download?format=${format}`)
    .buffer(true)
    .parse((res, cb) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => cb(null, Buffer.concat(chunks)))
    })

// The campaign's releases 1, 2 and 3, each made once by whichever test needs it first, so any test runs alone.
let first: { id: number; version: number }
let made1: Promise<{ id: number; version: number; [k: string]: unknown }> | null = null
const firstRelease = () =>
  (made1 ??= post(lead, '/api/releases', { campaignId: campaign.id, title: 'First look', description: 'Decided spectra of the first nights.' })
    .expect(201)
    .then((r) => (first = r.body.release)))
let made2: Promise<{ id: number; version: number; rows: number }> | null = null
/** Later: a new decision on a released spectrum, new metadata, and one more spectrum agreed; then release 2. */
const secondRelease = () =>
  (made2 ??= (async () => {
    await firstRelease()
    await decide(spectra.consensus!, { source: 'settled', spectralType: 'B9 II', typeCode: 19, luminosityClass: 'II', classCode: 3, nCalls: 3, agreement: 'settled', decidedBy: leadUser.id })
    await spectra.consensus!.update({ vMag: 12, objectName: 'Renamed star' })
    await decide(spectra.waiting!, { source: 'consensus', spectralType: 'K0 III', typeCode: 50, luminosityClass: 'III', classCode: 4, nCalls: 1 })
    await spectra.waiting!.update({ status: 'agreed' })
    return (await post(lead, '/api/releases', { campaignId: campaign.id, title: 'Second look' }).expect(201)).body.release
  })())
let made3: Promise<{ id: number; version: number; rows: number; description: string }> | null = null
const thirdRelease = () =>
  (made3 ??= secondRelease().then(async (second) => (await post(lead, `/api/releases/${second.id}/supersede`, { title: 'Third look', description: 'with corrections' }).expect(201)).body.release))

beforeEach(async () => {
  await firstRelease()
})

describe('POST /api/releases', () => {
  it('freezes every agreed or settled spectrum of the campaign as release 1', async () => {
    const release = await firstRelease()
    expect(release).toMatchObject({ version: 1, rows: 3, title: 'First look', supersededBy: null, campaign: { id: campaign.id }, createdBy: { name: 'Release Lead' } })
    const rows = await ReleaseRow.findAll({ where: { releaseId: first.id }, order: [['position', 'ASC']] })
    expect(rows.map((r) => r.spectrumId)).toEqual([spectra.consensus!.id, spectra.settled!.id, spectra.accepted!.id])
  })

  it('writes each row with its provenance and derived values', async () => {
    const res = await lead.agent.get(`/api/releases/${first.id}`).expect(200)
    expect(res.body.total).toBe(3)
    expect(res.body.columns.map((c: { name: string }) => c.name)).toContain('Teff')
    const [consensus, settled, accepted] = res.body.rows
    expect(consensus).toMatchObject({
      SpId: spectra.consensus!.id,
      Object: 'Field star, "north" 1',
      RAdeg: 150.25,
      DEdeg: -12.5,
      ObsDate: '2025-01-05T03:04:05.600',
      SpType: 'B8 III',
      TypeCode: 18,
      LumClass: 'III',
      ClassCode: 4,
      e_TypeCode: 0.5,
      e_ClassCode: 0.5,
      Decision: 'consensus of 2',
      DecidedBy: 'Caller One; Caller Two',
      Ncalls: 2,
      Agreement: 'within',
      LibVer: version.name,
      PipeVer: '1.0.0',
      SNR: 55.5,
      RV: -21.5,
      e_RV: 4.2,
      Vmag: 8.5,
      EBV: 0.1,
      Plx: 2.5,
      e_Plx: 0.1,
      DFlag: null,
    })
    // The same estimate shared/derived.ts gives for B8 III ± 0.5 with these inputs.
    const d = deriveParameters((parseMK('B8 III') as { ok: true; value: never }).value, {
      typeUncertainty: 0.5,
      classUncertainty: 0.5,
      apparentMagnitudeV: 8.5,
      ebv: 0.1,
      parallaxMas: 2.5,
      parallaxErrorMas: 0.1,
    })
    if (!d.ok) throw new Error('B8 III should be on the grid')
    // Each value is rounded to the decimal place of its uncertainty, given to two significant figures
    // but never past the units (common practice).
    const place = (err: number) => Math.max(0, 1 - Math.floor(Math.log10(err)))
    const rounded = (v: number, err: number) => Number(v.toFixed(place(err)))
    expect(consensus.e_Teff).toBe(rounded(d.teff.uncertainty, d.teff.uncertainty))
    expect(consensus.Teff).toBe(rounded(d.teff.value, d.teff.uncertainty))
    expect(consensus.Dist).toBe(rounded(d.spectroscopicDistancePc!.value, d.spectroscopicDistancePc!.uncertainty))
    expect(consensus.DistPlx).toBeCloseTo(400, 9)
    expect(consensus.Rad).toBe(rounded(d.radiusSolar.value, d.radiusSolar.uncertainty))
    expect(consensus).toMatchObject({ FileName: 'x.txt', SugType: 'B8 III' })
    // MJD 51544 is 2000-01-01 (common practice); 25 years with 7 leap days later, 2025-01-05 is 60680; 03:04:05.6 is 0.127843 d.
    expect(consensus.MJD).toBeCloseTo(60680.127843, 6)
    expect(settled).toMatchObject({ Decision: 'settled by lead', DecidedBy: 'Release Lead', SpType: 'G5 IV', Pec: 'e', Agreement: 'settled', Vmag: null, Dist: null })
    expect(settled.Teff).toBeGreaterThan(4000)
    expect(accepted).toMatchObject({
      Decision: 'single call (suggestion accepted)',
      Agreement: 'single',
      SpType: 'DA3',
      LumClass: null,
      Teff: null,
      Lum: null,
      DFlag: 'outside the MK grid',
      LibVer: null,
    })
  })

  it('refuses a campaign with nothing decided, a missing title and non-leads', async () => {
    const none = await post(lead, '/api/releases', { campaignId: empty.id, title: 'Empty' }).expect(409)
    expect(none.body.error.code).toBe('nothing_to_release')
    const bad = await post(lead, '/api/releases', { campaignId: campaign.id, title: '  ' }).expect(422)
    expect(bad.body.error.details.fields.title).toBe('is required')
    await post(observer, '/api/releases', { campaignId: campaign.id, title: 'Mine' }).expect(403)
    expect(await Release.count({ where: { campaignId: empty.id } })).toBe(0)
  })
})

describe('GET /api/releases/:id/download', () => {
  it('sends every format with its file name, to members of the campaign', async () => {
    const expected = {
      csv: ['text/csv', `${campaign.code}_release-1.csv`],
      ecsv: ['text/plain', `${campaign.code}_release-1.ecsv`],
      votable: ['application/x-votable+xml', `${campaign.code}_release-1.vot`],
      fits: ['application/fits', `${campaign.code}_release-1.fits`],
      mrt: ['application/zip', `${campaign.code}_release-1_table.zip`],
    }
    for (const [format, [type, name]] of Object.entries(expected)) {
      const res = await download(observer, first.id, format).expect(200)
      expect(res.headers['content-type']).toContain(type)
      // The content-disposition package quotes the name only when it has to.
      expect(res.headers['content-disposition']).toBe(`attachment; filename=${name}`)
      const body = res.body as Buffer
      if (format === 'fits') {
        expect(body.length % 2880).toBe(0)
        expect(body.toString('ascii', 0, 30)).toBe('SIMPLE  =                    T')
        expect(body.toString('ascii')).toContain('NAXIS2  =                    3')
      } else if (format === 'votable') {
        expect(body.toString('utf8')).toContain('<TABLE name="catalogue" nrows="3">')
      } else if (format === 'csv') {
        // Plain CSV: exactly one header line, then the rows.
        const lines = body
          .toString('utf8')
          .split('\r\n')
          .filter((l) => l)
        expect(lines).toHaveLength(4)
        expect(lines[0]!.startsWith('SpId,Object,')).toBe(true)
        expect(lines[1]).toContain('"Field star, ""north"" 1"')
      } else if (format === 'ecsv') {
        expect(body.toString('utf8').startsWith('# %ECSV 1.0')).toBe(true)
      } else {
        const files = unzipSync(body)
        expect(Object.keys(files).sort()).toEqual(['ReadMe', `${campaign.code}_release-1.dat`].sort())
        expect(Buffer.from(files.ReadMe!).toString('ascii')).toContain(`Byte-by-byte Description of file: ${campaign.code}_release-1.dat`)
      }
    }
    const anonymous = await agentFor(t.app)
    await anonymous.agent.get(`/api/releases/${first.id}/download?format=csv`).expect(401)
    const bad = await lead.agent.get(`/api/releases/${first.id}/download?format=xls`).expect(422)
    expect(bad.body.error.details.fields.format).toBe('must be one of csv, ecsv, votable, fits, mrt')
    await lead.agent.get('/api/releases/999999999/download?format=csv').expect(404)
  })
})

// Debian's Python with astropy (tests/reference/check_exports.py); npm test installs python3-astropy.
describe('a downloaded release read back with astropy', () => {
  it('has every column, unit, UCD and value of the release in every format', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'lw-release-'))
    try {
      const detail = (await lead.agent.get(`/api/releases/${first.id}`).expect(200)).body
      writeFileSync(join(dir, 'expected.json'), JSON.stringify({ columns: detail.columns, params: detail.params, rows: detail.rows }))
      const names = { votable: 'catalogue.vot', fits: 'catalogue.fits', csv: 'catalogue.csv', ecsv: 'catalogue.ecsv', mrt: 'catalogue.zip' }
      for (const [format, name] of Object.entries(names)) writeFileSync(join(dir, name), (await download(lead, first.id, format).expect(200)).body as Buffer)
      const report = join(dir, 'report.json')
      const run = spawnSync('/usr/bin/python3', ['tests/reference/check_exports.py', '--downloads', dir, report], { encoding: 'utf8', timeout: 60_000 })
      expect(run.error, 'Debian’s python3 with python3-astropy must be installed (npm test installs it)').toBeUndefined()
      expect(existsSync(report), run.stderr).toBe(true)
      const result = JSON.parse(readFileSync(report, 'utf8')) as { ok: boolean; checks: Array<{ file: string; ok: boolean; valuesCompared: number; problems: string[] }> }
      for (const c of result.checks) {
        expect(c.problems, c.file).toEqual([])
        expect(c.valuesCompared, c.file).toBe(detail.columns.length * 3)
      }
      expect(result.checks.map((c) => c.file)).toEqual(['catalogue.vot', 'catalogue.fits', 'catalogue.csv', 'catalogue.ecsv', `${campaign.code}_release-1.dat + ReadMe`])
      expect(result.ok).toBe(true)
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  }, 60_000)
})

describe('a frozen release', () => {
  it('does not change when later calls, decisions and metadata change, and a newer release supersedes it', async () => {
    const before: Record<string, Buffer> = {}
    for (const f of ['csv', 'ecsv', 'votable', 'fits', 'mrt']) before[f] = (await download(lead, first.id, f).expect(200)).body as Buffer
    const detailBefore = (await lead.agent.get(`/api/releases/${first.id}`).expect(200)).body

    const second = await secondRelease()
    expect(second).toMatchObject({ version: 2, rows: 4 })
    const rows = (await lead.agent.get(`/api/releases/${second.id}`).expect(200)).body.rows
    expect(rows[0]).toMatchObject({ Object: 'Renamed star', SpType: 'B9 II', Decision: 'settled by lead', Vmag: 12 })
    expect((await Release.findByPk(first.id))!.supersededBy).toBe(second.id)
    // Superseding sets one field; the rows and files stay as they were.
    for (const f of ['csv', 'ecsv', 'votable', 'fits', 'mrt']) expect(Buffer.compare((await download(lead, first.id, f).expect(200)).body as Buffer, before[f]!), f).toBe(0)
    const detailAfter = (await lead.agent.get(`/api/releases/${first.id}`).expect(200)).body
    // Its rows, columns and notes as served stay the same too (only the summary's supersededBy may change).
    expect({ ...detailAfter, release: null }).toEqual({ ...detailBefore, release: null })
  })

  it('refuses edits and removal at the model level', async () => {
    const release = (await Release.findByPk(first.id))!
    await expect(release.update({ title: 'Edited' })).rejects.toThrow('A release is frozen: only a newer release may supersede it, once.')
    await expect(release.update({ supersededBy: null })).rejects.toThrow('A release is frozen')
    await expect(release.destroy()).rejects.toThrow('Releases are never removed.')
    await expect(Release.update({ title: 'x' }, { where: { id: first.id } })).rejects.toThrow('Releases are updated one at a time')
    const row = (await ReleaseRow.findOne({ where: { releaseId: first.id } }))!
    await expect(row.update({ cells: '{}' })).rejects.toThrow('Release rows are frozen.')
    await expect(ReleaseRow.destroy({ where: { releaseId: first.id } })).rejects.toThrow('Release rows are frozen.')
    expect(await ReleaseRow.count({ where: { releaseId: first.id } })).toBe(3)
    expect((await Release.findByPk(first.id))!.title).toBe('First look')
  })
})

describe('POST /api/releases/:id/supersede', () => {
  it('makes the next version from the latest release and refuses one that is already superseded', async () => {
    const second = await secondRelease()
    const again = await post(lead, `/api/releases/${first.id}/supersede`, { title: 'Again' }).expect(409)
    expect(again.body.error.code).toBe('already_superseded')
    const third = await thirdRelease()
    expect(third).toMatchObject({ version: 3, rows: 4, description: 'with corrections' })
    expect((await Release.findByPk(second.id))!.supersededBy).toBe(third.id)
  })
})

describe('GET /api/releases', () => {
  it('lists the releases of a campaign, newest first, with their row counts', async () => {
    await thirdRelease()
    const res = await observer.agent.get(`/api/releases?campaign=${campaign.id}`).expect(200)
    expect(res.body.releases.map((r: { version: number; rows: number; supersededBy: number | null }) => [r.version, r.rows, r.supersededBy !== null])).toEqual([
      [3, 4, false],
      [2, 4, true],
      [1, 3, true],
    ])
    expect(res.body.releases[2].downloads.fits).toBe(`/api/releases/${first.id}/download?format=fits`)
  })
})

describe('GET /api/spectra/:id/derived', () => {
  it('derives from the decided classification, with the caution', async () => {
    const res = await observer.agent.get(`/api/spectra/${spectra.settled!.id}/derived`).expect(200)
    const d = res.body.derived
    expect(d.caution).toBe(DERIVED_CAUTION)
    expect(d.caution.startsWith('Calibration estimates, not measurements')).toBe(true)
    expect(d.basis).toEqual({ source: 'classification', spectralType: 'G5 IV', typeUncertainty: 0.5, classUncertainty: 0.5 })
    expect(d.estimates.ok).toBe(true)
    expect(d.estimates.teff.value).toBeGreaterThan(4000)
    expect(d.estimates.spectroscopicDistancePc).toBeUndefined()
  })

  it('falls back to the current suggestion, with its own uncertainty, and says when there is nothing to derive from', async () => {
    const res = await lead.agent.get(`/api/spectra/${spectra.suggested!.id}/derived`).expect(200)
    expect(res.body.derived.basis).toEqual({ source: 'suggestion', spectralType: 'A0 V', typeUncertainty: 1.5, classUncertainty: 0.7 })
    expect(res.body.derived.inputs.vMag).toBe(10)
    expect(res.body.derived.estimates.spectroscopicDistancePc.value).toBeGreaterThan(0)
    const none = await lead.agent.get(`/api/spectra/${spectra.bare!.id}/derived`).expect(200)
    expect(none.body.derived).toMatchObject({ basis: null, estimates: null })
    const wd = await lead.agent.get(`/api/spectra/${spectra.accepted!.id}/derived`).expect(200)
    expect(wd.body.derived.estimates).toMatchObject({ ok: false, flag: 'outside the MK grid' })
  })

  it("hides another observer's spectrum", async () => {
    await otherObserver.agent.get(`/api/spectra/${spectra.settled!.id}/derived`).expect(404)
  })
})
