import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Release, Spectrum } from '../../server/models'
import { agentFor, closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { send, signedInPerson, type Person } from '../helpers/review'
import { syntheticTextSpectrum, zipOf } from '../helpers/spectra'
import { makeCampaign, suggested } from '../helpers/world'

let t: TestContext
let observer: Person
let lead: Person
let campaignId: number
let seed = Math.floor(Math.random() * 1e6)

beforeAll(async () => {
  t = await createTestContext()
  observer = await signedInPerson(t.app, 'observer', 'Input Observer')
  lead = await signedInPerson(t.app, 'lead', 'Input Lead')
  campaignId = (await makeCampaign('IN', [observer])).id
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const upload = (who: Person = observer, campaign = campaignId) => who.client.agent.post('/api/spectra').set('x-csrf-token', who.client.csrf).field('campaignId', String(campaign))

describe('a batch with a bad file name', () => {
  it('gives every file its own result, truncating a name too long for the catalogue', async () => {
    const longName = `${'very-long-object-name-'.repeat(9)}.txt`
    expect(longName.length).toBeGreaterThan(190)
    const res = await upload()
      .attach('files', syntheticTextSpectrum(seed++), 'first.txt')
      .attach('files', syntheticTextSpectrum(seed++), longName)
      .attach('files', syntheticTextSpectrum(seed++), 'last.txt')
    expect(res.status).toBe(200)
    expect(res.body.results.map((r: { outcome: string }) => r.outcome)).toEqual(['accepted', 'accepted', 'accepted'])
    const stored = await Spectrum.findByPk(res.body.results[1].spectrumId)
    expect(stored!.objectName.length).toBeLessThanOrEqual(120)
    expect(longName.startsWith(stored!.objectName.replace(/…$/, ''))).toBe(true)
  })
})

describe('malformed uploads and bodies', () => {
  const raw = (contentType: string, body: string | Buffer) => observer.client.agent.post('/api/spectra').set('x-csrf-token', observer.client.csrf).set('content-type', contentType).send(body)
  const part = (boundary: string, name: string, value: string, filename?: string) =>
    `--${boundary}\r\nContent-Disposition: form-data; name="${name}"${filename !== undefined ? `; filename="${filename}"` : ''}\r\n${filename !== undefined ? 'Content-Type: text/plain\r\n' : ''}\r\n${value}\r\n`

  it('answers 400 with the error shape for a missing, wrong or unclosed boundary and a NUL in a file name', async () => {
    const spectrum = syntheticTextSpectrum(seed++).toString()
    const good = (b: string) => part(b, 'campaignId', String(campaignId)) + part(b, 'files', spectrum, 'a.txt') + `--${b}--\r\n`
    const cases: Array<[string, string, string]> = [
      ['no boundary', 'multipart/form-data', good('XYZ')],
      ['wrong boundary', 'multipart/form-data; boundary=NOTTHISONE', good('XYZ')],
      ['no closing boundary', 'multipart/form-data; boundary=XYZ', part('XYZ', 'campaignId', String(campaignId)) + part('XYZ', 'files', spectrum, 'a.txt')],
      ['NUL in a file name', 'multipart/form-data; boundary=XYZ', part('XYZ', 'campaignId', String(campaignId)) + part('XYZ', 'files', spectrum, 'a\u0000b.txt') + '--XYZ--\r\n'],
    ]
    for (const [label, type, body] of cases) {
      const res = await raw(type, body)
      expect(`${label}: ${res.status}`).toBe(`${label}: 400`)
      expect(res.body.error.code, label).toMatch(/^[a-z_]+$/)
      expect(typeof res.body.error.message).toBe('string')
    }
  })

  it('answers 422 to a 5,000-deep array as an e-mail address', async () => {
    const body = `{"email":${'['.repeat(5000)}"x@example.org"${']'.repeat(5000)},"password":"whatever it is"}`
    for (const path of ['/api/auth/login', '/api/auth/forgot']) {
      const anon = await agentFor(t.app)
      const res = await anon.agent.post(path).set('x-csrf-token', anon.csrf).set('content-type', 'application/json').send(body)
      expect(`${path}: ${res.status}`).toMatch(/: (400|422)$/)
      expect(res.body.error).toBeDefined()
    }
  })
})

describe('strict schemas', () => {
  it('refuses wrong types with 422 naming the field, and stores nothing', async () => {
    const s = await suggested(t.ctx.sequelize, await makeCampaign('ST', [observer]), observer)
    for (const vMag of [[], true, {}, '1e400', ' ']) {
      const res = await send(observer.client, 'patch', `/api/spectra/${s.id}`, { vMag })
      expect(res.status, JSON.stringify(vMag)).toBe(422)
      expect(Object.keys(res.body.error.details.fields)).toEqual(['vMag'])
    }
    expect((await Spectrum.findByPk(s.id))!.vMag).toBeNull()
    await send(observer.client, 'patch', `/api/spectra/${s.id}`, { vMag: 8.25 }).expect(200)
    expect((await Spectrum.findByPk(s.id))!.vMag).toBe(8.25)

    const before = await Release.count()
    const release = await send(lead.client, 'post', '/api/releases', { campaignId: true, title: 'Coerced' })
    expect(release.status).toBe(422)
    expect(Object.keys(release.body.error.details.fields)).toEqual(['campaignId'])
    expect(await Release.count()).toBe(before)
  })

  it('still reads numbers sent as form fields in an upload, but not booleans or repeated fields', async () => {
    const ok = await upload().field('vMag', '7.5').attach('files', syntheticTextSpectrum(seed++), 'v.txt').expect(200)
    expect((await Spectrum.findByPk(ok.body.results[0].spectrumId))!.vMag).toBe(7.5)
    const bad = await upload().field('vMag', 'true').attach('files', syntheticTextSpectrum(seed++), 'w.txt').expect(422)
    expect(Object.keys(bad.body.error.details.fields)).toEqual(['vMag'])
    const twice = await upload().field('vMag', '7').field('vMag', '8').attach('files', syntheticTextSpectrum(seed++), 'x.txt').expect(422)
    expect(Object.keys(twice.body.error.details.fields)).toEqual(['vMag'])
  })

  it('refuses control characters in names', async () => {
    const s = await suggested(t.ctx.sequelize, await makeCampaign('CC', [observer]), observer)
    for (const objectName of ['HD\u0000 1', 'HD 1\nHD 2', 'HD\u001b[31m 1']) {
      const res = await send(observer.client, 'patch', `/api/spectra/${s.id}`, { objectName })
      expect(res.status).toBe(422)
      expect(res.body.error.details.fields.objectName).toMatch(/control characters/)
    }
    const person = await send(lead.client, 'post', '/api/users', { email: `cc-${seed++}@test.example`, name: 'Ann\r\nBcc: x', role: 'observer' })
    expect(person.status).toBe(422)
    expect(person.body.error.details.fields.name).toMatch(/control characters/)
    const campaign = await send(lead.client, 'post', '/api/campaigns', { code: `CC${seed++}`, name: 'Fields\u0000' })
    expect(campaign.status).toBe(422)
    // Notes may have line breaks.
    await send(observer.client, 'patch', `/api/spectra/${s.id}`, { notes: 'first line\nsecond line' }).expect(200)
  })
})

describe('zip batches', () => {
  it('reports each entry it skips, naming the ones that point outside the archive', async () => {
    const zip = zipOf({
      'good.txt': new Uint8Array(syntheticTextSpectrum(seed++)),
      '../escape.txt': new Uint8Array(syntheticTextSpectrum(seed++)),
      'dir/../../deeper.txt': new Uint8Array(syntheticTextSpectrum(seed++)),
      '.hidden.txt': new Uint8Array(syntheticTextSpectrum(seed++)),
    })
    const res = await upload().attach('files', zip, 'batch.zip').expect(200)
    const byName = Object.fromEntries(res.body.results.map((r: { file: string }) => [r.file, r]))
    expect(byName['batch.zip/good.txt'].outcome).toBe('accepted')
    expect(byName['batch.zip/../escape.txt']).toMatchObject({ outcome: 'refused', code: 'ZIP_UNSAFE_PATH' })
    expect(byName['batch.zip/dir/../../deeper.txt']).toMatchObject({ outcome: 'refused', code: 'ZIP_UNSAFE_PATH' })
    expect(byName['batch.zip/.hidden.txt']).toMatchObject({ outcome: 'refused', code: 'ZIP_ENTRY_SKIPPED' })
    expect(res.body.results).toHaveLength(4)
  })
})

describe('duplicates', () => {
  it('are found within a campaign only, and never name a spectrum the caller cannot see', async () => {
    const colleague = await signedInPerson(t.app, 'observer', 'Same Campaign Observer')
    const elsewhere = await signedInPerson(t.app, 'observer', 'Other Campaign Observer')
    const mine = await makeCampaign('D1', [observer, colleague])
    const theirs = await makeCampaign('D2', [elsewhere])
    const bytes = syntheticTextSpectrum(seed++)
    const first = await upload(observer, mine.id).attach('files', bytes, 'star.txt').expect(200)
    const id = first.body.results[0].spectrumId
    // The same file in another campaign is a new spectrum there, and says nothing of the first.
    const other = await upload(elsewhere, theirs.id).attach('files', bytes, 'star.txt').expect(200)
    expect(other.body.results[0].outcome).toBe('accepted')
    expect(other.body.results[0].spectrumId).not.toBe(id)
    // In the same campaign: a duplicate; its id only for someone who may see it.
    const again = await upload(observer, mine.id).attach('files', bytes, 'star-again.txt').expect(200)
    expect(again.body.results[0]).toMatchObject({ outcome: 'duplicate', spectrumId: id })
    const hidden = await upload(colleague, mine.id).attach('files', bytes, 'star-copy.txt').expect(200)
    expect(hidden.body.results[0]).toMatchObject({ outcome: 'duplicate', spectrumId: null })
    expect(hidden.body.results[0].message).not.toContain(String(id))
    expect(await Spectrum.count({ where: { fileSha256: createHash('sha256').update(bytes).digest('hex') } })).toBe(2)
  })
})
