// A database made when observed-v1 was the shipped version: at start the newer shipped version takes
// over, the standards it leaves out are retired, and observed-v1 can still be re-made whole.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { LibraryVersion, LibraryVersionStandard, Standard } from '../../server/models'
import { ensureDefaultLibrary, librarySpecFor } from '../../server/services/standards.service'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt, preparedLibrary } from '../../server/spectra/match/load'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'

let t: TestContext
beforeAll(async () => {
  t = await createTestContext()
}, 60_000)
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('ensureDefaultLibrary over a database that has observed-v1', () => {
  it('makes the shipped version active, retires what it leaves out and keeps observed-v1 whole', async () => {
    const { library } = observedLibraryAt(DEFAULT_OBSERVED_DIR)
    const current = await ensureDefaultLibrary(t.ctx.sequelize)
    // observed-v1 as an earlier start made it: every row of flux.f32 a standard, active.
    const retiredEntries = library.retired.map((s) => s.entry)
    const have = new Set((await Standard.findAll({ where: { templateId: retiredEntries.map((e) => e.id) } })).map((s) => s.templateId))
    await Standard.bulkCreate(
      retiredEntries
        .filter((e) => !have.has(e.id))
        .map((e) => ({
          source: 'observed' as const,
          templateId: e.id,
          star: e.star,
          origin: 'MILES stellar library v9.1',
          spectralType: e.spectralType,
          typeCode: e.typeCode,
          luminosityClass: e.luminosityClass,
          classCode: e.classCode,
          teff: e.teff,
          logg: e.logg,
          feh: e.feh,
          resolutionFwhm: 2.5,
          note: `${e.star}, published as "${e.publishedType}"; observed-v1`,
          modelId: null,
          spectrumId: null,
          rectified: null,
          addedBy: null,
          retiredAt: null,
        })),
    )
    const rowIds = library.manifest.entries.filter((e) => e.row !== undefined).map((e) => e.id)
    const all = await Standard.findAll({ where: { templateId: rowIds } })
    expect(all.length).toBe(rowIds.length)
    let v1 = await LibraryVersion.findOne({ where: { name: 'observed-v1' } })
    if (!v1) {
      v1 = await LibraryVersion.create({ name: 'observed-v1', description: 'as shipped before', status: 'published', isActive: false, publishedAt: new Date(), publishedBy: null })
      await LibraryVersionStandard.bulkCreate(all.map((s) => ({ versionId: v1!.id, standardId: s.id })))
    }
    await LibraryVersion.update({ isActive: false }, { where: {} })
    await LibraryVersion.update({ isActive: true }, { where: { id: v1.id } })

    const shipped = await ensureDefaultLibrary(t.ctx.sequelize)
    expect(shipped.id).toBe(current.id)
    expect(shipped.name).toBe(library.manifest.version)
    expect((await LibraryVersion.findOne({ where: { isActive: true } }))!.id).toBe(shipped.id)
    const retired = await Standard.findAll({ where: { templateId: retiredEntries.map((e) => e.id) } })
    expect(retired.length).toBe(retiredEntries.length)
    for (const s of retired) {
      expect(s.retiredAt).not.toBeNull()
      expect(s.note).toMatch(new RegExp(`Left out of ${library.manifest.version}: (metal-poor|the published class)`))
    }
    expect(await LibraryVersionStandard.count({ where: { versionId: shipped.id } })).toBe(library.standards.length)

    // observed-v1 is still re-made from all its rows, the retired ones included.
    const spec = await librarySpecFor(v1.id)
    expect(preparedLibrary(spec).standards.length).toBe(rowIds.length)
  }, 120_000)

  it('does not take over from a team’s own active version', async () => {
    const shipped = await ensureDefaultLibrary(t.ctx.sequelize)
    const own = await LibraryVersion.create({ name: `team-${Date.now()}`, description: 'a team version', status: 'published', isActive: false, publishedAt: new Date(), publishedBy: null })
    await LibraryVersion.update({ isActive: false }, { where: {} })
    await LibraryVersion.update({ isActive: true }, { where: { id: own.id } })
    await ensureDefaultLibrary(t.ctx.sequelize)
    expect((await LibraryVersion.findOne({ where: { isActive: true } }))!.id).toBe(own.id)
    await LibraryVersion.update({ isActive: false }, { where: {} })
    await LibraryVersion.update({ isActive: true }, { where: { id: shipped.id } })
  })
})
