import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { Op, type Sequelize } from 'sequelize'
import { DEFAULT_GRID, gridWavelength } from '../../shared/grid'
import { formatMK, parseMK } from '../../shared/mk'
import type { ObservedLibraryManifest } from '../../templates/observed/library'
import { DEFAULT_MODEL_DIR, DEFAULT_OBSERVED_DIR, modelLibraryAt, observedInputByTemplate, type LibrarySpec } from '../spectra/match/load'
import { bufferToFloat32, float32ToBuffer } from '../lib/binary'
import { HttpError, notFound } from '../lib/http-error'
import { LibraryVersion, LibraryVersionStandard, Measurement, Spectrum, Standard, Suggestion, type User } from '../models'
import { replaceModelsByObserved } from '../spectra/match'
import { resolutionFwhm } from '../spectra/pipeline'
import type { AddStandardInput, PublishVersionInput, StandardProvenance, StandardSummary, StandardsLibrary, VersionChanges, VersionSummary } from '../../shared/api/standards'

export type { StandardSummary, VersionSummary }

/** Name of the version made from the model library, the default before the observed library. */
export const MODEL_VERSION_NAME = 'model-v1'

/**
 * Makes sure the default version exists: one `standards` row per standard of the shipped observed
 * library (template_id = its id, with star, source, published type and parameters) and a published
 * version holding them all. It becomes the active version when none is active or when the active
 * one is the old model library or an earlier shipped version (manifest.earlierVersions), never a
 * team's own. The standards the shipped version leaves out (retiredIn) are retired, with the reason
 * in their note; the versions holding them keep them. The model standards, where a database still
 * has them, are retired too: on real stars they suggested the right type far less often
 * (bench/results/accuracy.txt). Safe to call at every start.
 */
export async function ensureDefaultLibrary(sequelize: Sequelize, observedDir = DEFAULT_OBSERVED_DIR): Promise<LibraryVersion> {
  const manifest = JSON.parse(readFileSync(join(observedDir, 'manifest.json'), 'utf8')) as ObservedLibraryManifest
  return sequelize.transaction(async (transaction) => {
    const active = await LibraryVersion.findOne({ where: { isActive: true }, transaction })
    await Standard.update({ retiredAt: new Date() }, { where: { source: 'model', retiredAt: null }, transaction })
    // Standards an earlier shipped version had and this one leaves out: retired, the reason kept in their note.
    const retiredEntries = new Map(manifest.entries.filter((e) => e.retiredIn !== undefined).map((e) => [e.id, e]))
    if (retiredEntries.size > 0) {
      const toRetire = await Standard.findAll({ where: { templateId: { [Op.in]: [...retiredEntries.keys()] }, retiredAt: null }, transaction })
      for (const st of toRetire) {
        const e = retiredEntries.get(st.templateId!)!
        await st.update({ retiredAt: new Date(), note: `${st.note} Left out of ${e.retiredIn}: ${e.excludedBecause}.` }, { transaction })
      }
    }
    // A newer shipped version takes over from the model grid or an earlier shipped version, never from a team's own.
    const takeOver = !active || active.name === MODEL_VERSION_NAME || ((manifest.earlierVersions ?? []).includes(active.name) && active.name !== manifest.version)
    const existing = await LibraryVersion.findOne({ where: { name: manifest.version }, transaction })
    if (existing) {
      if (takeOver) {
        await LibraryVersion.update({ isActive: false }, { where: { isActive: true }, transaction })
        await existing.update({ isActive: true }, { transaction })
      }
      return existing
    }
    const sources = new Map(manifest.sources.map((src) => [src.key, src]))
    const kept = manifest.entries.filter((e) => e.row !== undefined && e.excludedBecause === undefined)
    const have = new Set((await Standard.findAll({ where: { templateId: { [Op.ne]: null } }, attributes: ['templateId'], transaction })).map((s) => s.templateId))
    await Standard.bulkCreate(
      kept
        .filter((e) => !have.has(e.id))
        .map((e) => {
          const src = sources.get(e.source)!
          return {
            source: 'observed' as const,
            modelId: null,
            templateId: e.id,
            spectrumId: null,
            star: e.star,
            origin: src.name,
            spectralType: e.spectralType!,
            typeCode: e.typeCode!,
            luminosityClass: e.luminosityClass!,
            classCode: e.classCode!,
            teff: e.teff,
            logg: e.logg,
            feh: e.feh,
            resolutionFwhm: src.resolutionFwhm,
            note: `${e.star}, published as "${e.publishedType}": ${src.name} (${src.reference}); ${manifest.version}`,
            rectified: null,
            addedBy: null,
            retiredAt: null,
          }
        }),
      { transaction },
    )
    const ids = new Set(kept.map((e) => e.id))
    const rows = (await Standard.findAll({ where: { templateId: { [Op.ne]: null } }, attributes: ['id', 'templateId'], transaction })).filter((s) => ids.has(s.templateId!))
    if (takeOver) await LibraryVersion.update({ isActive: false }, { where: { isActive: true }, transaction })
    const version = await LibraryVersion.create(
      {
        name: manifest.version,
        description: `The shipped observed standards (${rows.length} real stars of published type from ${manifest.sources.map((src) => src.name).join(' and ')}), templates/${manifest.version}.`,
        status: 'published',
        isActive: takeOver,
        publishedAt: new Date(),
        publishedBy: null,
      },
      { transaction },
    )
    await LibraryVersionStandard.bulkCreate(
      rows.map((s) => ({ versionId: version.id, standardId: s.id })),
      { transaction },
    )
    return version
  })
}

const SUMMARY_ATTRIBUTES = { exclude: ['rectified'] }

/** Resolution of the sharpest shipped standards (MILES, 2.5 Å FWHM): spectra are never measured sharper. */
const SHARPEST_SHIPPED_FWHM = 2.5

/** Every version and every standard (without arrays), and which version is active. */
export async function listLibrary(): Promise<StandardsLibrary> {
  const [versions, standards, links] = await Promise.all([
    LibraryVersion.findAll({ order: [['id', 'ASC']] }),
    Standard.findAll({
      attributes: SUMMARY_ATTRIBUTES,
      order: [
        ['typeCode', 'ASC'],
        ['classCode', 'DESC'],
        ['id', 'ASC'],
      ],
    }),
    LibraryVersionStandard.findAll(),
  ])
  const byStandard = new Map<number, number[]>()
  const counts = new Map<number, number>()
  for (const l of links) {
    byStandard.set(l.standardId, [...(byStandard.get(l.standardId) ?? []), l.versionId])
    counts.set(l.versionId, (counts.get(l.versionId) ?? 0) + 1)
  }
  return {
    activeVersionId: versions.find((v) => v.isActive)?.id ?? null,
    versions: versions.map((v) => toVersionSummary(v, counts.get(v.id) ?? 0)),
    standards: standards.map((s) => toStandardSummary(s, byStandard.get(s.id) ?? [])),
  }
}

export function toVersionSummary(v: LibraryVersion, standardCount: number): VersionSummary {
  return {
    id: v.id,
    name: v.name,
    description: v.description,
    status: v.status,
    isActive: v.isActive,
    publishedAt: v.publishedAt?.toISOString() ?? null,
    publishedBy: v.publishedBy,
    standardCount,
    instrumentId: v.instrumentId ?? null,
    basedOnId: v.basedOnId ?? null,
    changes: v.changes ? (JSON.parse(v.changes) as VersionChanges) : null,
  }
}

export function toStandardSummary(s: Standard, versionIds: number[]): StandardSummary {
  return {
    id: s.id,
    source: s.source,
    modelId: s.modelId,
    templateId: s.templateId ?? null,
    star: s.star ?? null,
    origin: s.origin ?? null,
    spectrumId: s.spectrumId,
    spectralType: s.spectralType,
    typeCode: s.typeCode,
    luminosityClass: s.luminosityClass,
    classCode: s.classCode,
    teff: s.teff,
    logg: s.logg,
    feh: s.feh ?? null,
    resolutionFwhm: s.resolutionFwhm ?? null,
    note: s.note,
    addedBy: s.addedBy,
    retiredAt: s.retiredAt?.toISOString() ?? null,
    createdAt: s.createdAt.toISOString(),
    versionIds: [...versionIds].sort((a, b) => a - b),
    instrumentId: s.instrumentId ?? null,
    provenance: s.provenance ? (JSON.parse(s.provenance) as StandardProvenance) : null,
  }
}

export type { AddStandardInput }

/**
 * Adds an observed standard: the spectrum's current rectified measurement is copied into the
 * standard (so later re-measurements do not change it). The type and class must read as MK
 * notation with a subtype and a class (shared/mk.ts).
 */
export async function addObservedStandard(user: User, input: AddStandardInput): Promise<StandardSummary> {
  const parsed = parseMK(`${input.spectralType.trim()} ${input.luminosityClass.trim()}`)
  if (!parsed.ok) throw new HttpError(422, 'invalid_classification', `"${input.spectralType} ${input.luminosityClass}" is not MK notation: ${parsed.reason}`)
  const v = parsed.value
  if (v.kind !== 'mk' || v.typeCode === undefined || v.classCode === undefined || v.luminosityClass === undefined || v.composite || v.typeRange || v.classRange) {
    throw new HttpError(422, 'invalid_classification', 'A standard needs one MK type with a subtype and one luminosity class (no ranges or composites).')
  }
  const spectrum = await Spectrum.findByPk(input.spectrumId, { attributes: ['id'] })
  if (!spectrum) throw notFound('The spectrum')
  const m = await Measurement.findOne({ where: { spectrumId: input.spectrumId, isCurrent: true } })
  if (!m) throw new HttpError(409, 'not_measured', 'This spectrum has no measurement yet; wait for it to be processed.')
  if (m.gridStart !== DEFAULT_GRID.start || m.gridStep !== DEFAULT_GRID.step || m.gridLength !== DEFAULT_GRID.length) {
    throw new HttpError(409, 'grid_mismatch', 'The measurement is on a different grid from the standards library.')
  }
  // Measured at the library level for its resolution (pipeline.ts): that is the standard's resolution.
  const suggestion = await Suggestion.findOne({ where: { spectrumId: input.spectrumId, isCurrent: true }, attributes: ['details'] })
  const level = suggestion?.details ? ((JSON.parse(suggestion.details) as { resolution?: { level?: number | null } }).resolution?.level ?? null) : null
  const rectified = bufferToFloat32(m.rectified)
  const mask = m.mask
  for (let i = 0; i < rectified.length; i++) if (mask[i] === 1) rectified[i] = Number.NaN
  const canonical = formatMK({ ...v, peculiarities: [], lineTypes: [], uncertain: { prefix: false, type: false, class: false } })
  const s = await Standard.create({
    source: 'observed',
    modelId: null,
    spectrumId: input.spectrumId,
    spectralType: canonical,
    typeCode: v.typeCode,
    luminosityClass: v.luminosityClass,
    classCode: v.classCode,
    teff: null,
    logg: null,
    resolutionFwhm: level,
    note: input.note.trim(),
    rectified: float32ToBuffer(rectified),
    addedBy: user.id,
    retiredAt: null,
  })
  await s.reload({ attributes: SUMMARY_ATTRIBUTES })
  return toStandardSummary(s, [])
}

/** Retires a standard: later versions leave it out; versions already published keep it. */
export async function retireStandard(id: number): Promise<StandardSummary> {
  const s = await Standard.findByPk(id, { attributes: SUMMARY_ATTRIBUTES })
  if (!s) throw notFound('The standard')
  if (s.retiredAt) throw new HttpError(409, 'already_retired', 'This standard is already retired.')
  await s.update({ retiredAt: new Date() })
  const links = await LibraryVersionStandard.findAll({ where: { standardId: id } })
  return toStandardSummary(
    s,
    links.map((l) => l.versionId),
  )
}

/**
 * Publishes a new version from the standards that are not retired (observed standards replace
 * model ones of the same type and class) and makes it the active one.
 */
export async function publishVersion(sequelize: Sequelize, user: User, input: PublishVersionInput): Promise<VersionSummary> {
  if (await LibraryVersion.findOne({ where: { name: input.name } })) throw new HttpError(409, 'name_taken', `A version named "${input.name}" already exists.`)
  const live = await Standard.findAll({ where: { retiredAt: null }, attributes: ['id', 'source', 'typeCode', 'classCode'] })
  const kept = replaceModelsByObserved(live)
  if (kept.length === 0) throw new HttpError(409, 'empty_library', 'Every standard is retired: a version needs at least one.')
  const version = await sequelize.transaction(async (transaction) => {
    await LibraryVersion.update({ isActive: false }, { where: { isActive: true }, transaction })
    const v = await LibraryVersion.create({ name: input.name, description: input.description, status: 'published', isActive: true, publishedAt: new Date(), publishedBy: user.id }, { transaction })
    await LibraryVersionStandard.bulkCreate(
      kept.map((s) => ({ versionId: v.id, standardId: s.id })),
      { transaction },
    )
    return v
  })
  return toVersionSummary(version, kept.length)
}

/** A standard's rectified flux as float32 columns [wavelength, rectified] over its covered pixels. */
export async function standardSeries(
  id: number,
  modelDir = DEFAULT_MODEL_DIR,
  observedDir = DEFAULT_OBSERVED_DIR,
): Promise<{ layout: { points: number; columns: string[]; standardId: number; spectralType: string; source: string }; body: Buffer }> {
  const s = await Standard.findByPk(id)
  if (!s) throw notFound('The standard')
  let values: ArrayLike<number>
  if (s.templateId) {
    const row = observedInputByTemplate(observedDir, s.templateId)
    if (!row) throw notFound('The data of this standard')
    values = row.rectified
  } else if (s.source === 'observed') {
    if (!s.rectified) throw notFound('The data of this standard')
    values = bufferToFloat32(s.rectified)
  } else {
    const row = modelLibraryAt(modelDir).standards.find((m) => m.entry.id === s.modelId)
    if (!row) throw notFound('The model data of this standard')
    values = row.rectified
  }
  let from = 0
  let to = values.length
  while (from < to && !Number.isFinite(values[from]!)) from++
  while (to > from && !Number.isFinite(values[to - 1]!)) to--
  const points = to - from
  const out = new Float32Array(points * 2)
  for (let k = 0; k < points; k++) {
    out[k] = gridWavelength(DEFAULT_GRID, from + k)
    out[points + k] = values[from + k]!
  }
  return {
    layout: { points, columns: ['wavelength', 'rectified'], standardId: s.id, spectralType: s.spectralType, source: s.source },
    body: Buffer.from(out.buffer, out.byteOffset, out.byteLength),
  }
}

/** The active version's id, or null when there is none. */
export async function activeVersionId(): Promise<number | null> {
  return (await LibraryVersion.findOne({ where: { isActive: true }, attributes: ['id'] }))?.id ?? null
}

/** What a worker needs to build a version's prepared library (model and template ids; uploaded standards' arrays). */
export async function librarySpecFor(versionId: number, modelDir = DEFAULT_MODEL_DIR, observedDir = DEFAULT_OBSERVED_DIR): Promise<LibrarySpec> {
  const version = await LibraryVersion.findByPk(versionId)
  if (!version) throw notFound('The library version')
  const ids = (await LibraryVersionStandard.findAll({ where: { versionId } })).map((l) => l.standardId)
  const standards = await Standard.findAll({ where: { id: { [Op.in]: ids } } })
  const spectra = await Spectrum.findAll({
    where: { id: { [Op.in]: standards.flatMap((s) => (s.spectrumId !== null ? [s.spectrumId] : [])) } },
    attributes: ['id', 'resolutionFwhm', 'resolvingPower'],
  })
  const resolution = new Map(spectra.map((sp) => [sp.id, resolutionFwhm(sp.resolutionFwhm, sp.resolvingPower)]))
  return {
    versionId,
    name: version.name,
    modelDir,
    models: standards.filter((s) => s.source === 'model' && s.modelId).map((s) => ({ standardId: s.id, modelId: s.modelId! })),
    observedDir,
    templates: standards.filter((s) => s.templateId).map((s) => ({ standardId: s.id, templateId: s.templateId! })),
    observed: standards
      .filter((s) => s.source === 'observed' && !s.templateId && s.rectified)
      .map((s) => ({
        standardId: s.id,
        spectralType: s.spectralType,
        typeCode: s.typeCode,
        luminosityClass: s.luminosityClass,
        classCode: s.classCode,
        teff: s.teff,
        logg: s.logg,
        feh: s.feh ?? null,
        origin:
          s.instrumentId !== null && s.instrumentId !== undefined
            ? `${s.origin ?? 'instrument'}, spectrum ${s.spectrumId}`
            : s.spectrumId !== null
              ? `uploaded spectrum ${s.spectrumId}`
              : 'uploaded spectrum',
        instrumentId: s.instrumentId ?? null,
        star: s.star ?? null,
        snr: s.provenance ? (JSON.parse(s.provenance) as StandardProvenance).snr : null,
        rectified: Float32Array.from(bufferToFloat32(s.rectified!)),
        // Measurements are made at the library level at or above the spectrum's resolution, never sharper than the sharpest shipped standards (pipeline.ts).
        resolutionFwhm: s.resolutionFwhm ?? Math.max(SHARPEST_SHIPPED_FWHM, (s.spectrumId !== null ? resolution.get(s.spectrumId) : undefined) ?? SHARPEST_SHIPPED_FWHM),
      })),
  }
}
