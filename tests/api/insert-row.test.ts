import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { UniqueConstraintError } from 'sequelize'
import { insertModelRow } from '../../server/db/execute'
import { Campaign, Spectrum } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, type TestContext } from '../helpers/context'

let t: TestContext
let campaign: Campaign
let userId: number

beforeAll(async () => {
  t = await createTestContext()
  campaign = await Campaign.create({ code: `IR-${Date.now()}`, name: 'Insert rows', description: '' })
  userId = (await makeUser('observer')).user.id
}, 60_000)
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const row = (sha: string) => ({
  campaignId: campaign.id,
  submittedBy: userId,
  batchId: null,
  statusReason: null,
  objectName: 'KRF insert test',
  raDeg: 10.5,
  decDeg: -20.25,
  obsDate: new Date('2026-03-04T05:06:07.089Z'),
  exposureS: null,
  instrument: 'Kestrel Ridge slit',
  instrumentId: null,
  resolutionFwhm: 3.2,
  resolvingPower: null,
  vMag: null,
  parallaxMas: null,
  parallaxErrorMas: null,
  ebv: null,
  notes: '',
  fileName: 'insert.fits',
  fileSha256: sha,
  fileSize: 1234,
  format: 'fits-image',
  hdu: 0,
  pixels: 1200,
  wlMin: 3800,
  wlMax: 5600,
  dispersion: 1.5,
  snr: 80,
  vacuumConverted: true,
  readInfo: '{}',
})

describe('inserting a model row through the binary protocol', () => {
  it('writes what Model.create writes: the given values, the model defaults and both timestamps', async () => {
    const before = Date.now()
    const id = await t.ctx.sequelize.transaction((transaction) => insertModelRow(transaction, Spectrum, row('a'.repeat(64))))
    const s = (await Spectrum.findByPk(id))!
    expect(s.get({ plain: true })).toMatchObject({ ...row('a'.repeat(64)), status: 'received', extraCalls: 0, flagCount: 0, readChoices: '{}' })
    expect(s.createdAt.getTime()).toBeGreaterThanOrEqual(before - 1000)
    expect(s.updatedAt.getTime()).toBe(s.createdAt.getTime())
    const made = await Spectrum.create(row('b'.repeat(64)))
    const plain = (x: Spectrum) => {
      const { id: _i, createdAt: _c, updatedAt: _u, fileSha256: _f, ...rest } = x.get({ plain: true })
      return rest
    }
    expect(plain(s)).toEqual(plain((await Spectrum.findByPk(made.id))!))
  })

  it('raises a duplicate key as UniqueConstraintError and keeps the first row', async () => {
    const sha = 'c'.repeat(64)
    await t.ctx.sequelize.transaction((transaction) => insertModelRow(transaction, Spectrum, row(sha)))
    const again = t.ctx.sequelize.transaction((transaction) => insertModelRow(transaction, Spectrum, { ...row(sha), objectName: 'second' }))
    await expect(again).rejects.toBeInstanceOf(UniqueConstraintError)
    const kept = await Spectrum.findAll({ where: { campaignId: campaign.id, fileSha256: sha } })
    expect(kept.map((s) => s.objectName)).toEqual(['KRF insert test'])
  })
})
