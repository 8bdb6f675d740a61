import { Op, type Sequelize, type Transaction } from 'sequelize'
import { cellKey, coverageCell, type CoverageCell } from '../../shared/coverage'
import { DEFAULT_GRID } from '../../shared/grid'
import { formatMK, parseMK } from '../../shared/mk'
import { bufferToFloat32, float32ToBuffer } from '../lib/binary'
import { HttpError, notFound } from '../lib/http-error'
import { Classification, Instrument, LibraryVersion, LibraryVersionStandard, Measurement, ReviewCall, Spectrum, Standard, Suggestion, User } from '../models'
import type { DecisionRecord, InstrumentCandidate, InstrumentCandidates } from '../../shared/api/instruments'
import type { StandardProvenance, StandardSummary, VersionChanges, VersionSummary } from '../../shared/api/standards'
import { getInstrument } from './instruments.service'
import { namesOf } from './review.service'
import { toStandardSummary, toVersionSummary } from './standards.service'

/** What one spectrum of an instrument is, as a possible standard of it. */
type Assessment = { ok: true; candidate: InstrumentCandidate; canonical: string; level: number | null; measurementId: number } | { ok: false; reason: string }

interface InstrumentState {
  instrument: Instrument
  active: LibraryVersion | null
  /** Standard ids of the active version. */
  members: number[]
  /** The instrument's own standards in the active version. */
  own: Standard[]
  coverage: CoverageCell[]
  assessed: Map<number, Assessment>
}

const listNames = (names: string[]) => (names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`)

/**
 * Every spectrum of the instrument judged as a possible standard of it. A candidate is decided —
 * agreed with every standing call the same, by at least two classifiers, or settled by a lead — as
 * one MK type and class; has a current measurement on the library grid and a current suggestion
 * without quality flags; reaches the instrument's S/N threshold; is not (and was never) one of its
 * standards; and fills a cell of type × class coverage (shared/coverage.ts) that none of the
 * instrument's standards in the active version fills.
 */
async function assess(instrument: Instrument): Promise<InstrumentState> {
  const active = await LibraryVersion.findOne({ where: { isActive: true } })
  const members = active ? (await LibraryVersionStandard.findAll({ where: { versionId: active.id }, attributes: ['standardId'] })).map((l) => l.standardId) : []
  const own = members.length
    ? await Standard.findAll({
        where: { id: { [Op.in]: members }, instrumentId: instrument.id },
        attributes: { exclude: ['rectified'] },
        order: [
          ['typeCode', 'ASC'],
          ['classCode', 'ASC'],
        ],
      })
    : []
  const covered = new Map<string, CoverageCell>()
  for (const s of own) {
    const cell = coverageCell(s.typeCode, s.classCode)
    covered.set(cellKey(cell), cell)
  }
  const spectra = await Spectrum.findAll({ where: { instrumentId: instrument.id }, attributes: ['id', 'objectName', 'snr'], order: [['id', 'ASC']] })
  const ids = spectra.map((s) => s.id)
  const [decisions, measurements, suggestions, standards] = ids.length
    ? await Promise.all([
        Classification.findAll({ where: { spectrumId: { [Op.in]: ids } }, order: [['id', 'ASC']] }),
        Measurement.findAll({ where: { spectrumId: { [Op.in]: ids }, isCurrent: true }, attributes: ['id', 'spectrumId', 'snr', 'gridStart', 'gridStep', 'gridLength'] }),
        Suggestion.findAll({ where: { spectrumId: { [Op.in]: ids }, isCurrent: true }, attributes: ['id', 'spectrumId', 'spectralType', 'flags', 'libraryVersionId', 'details'] }),
        Standard.findAll({ where: { spectrumId: { [Op.in]: ids } }, attributes: ['id', 'spectrumId', 'retiredAt'] }),
      ])
    : [[], [], [], []]
  const decision = new Map<number, Classification>()
  for (const d of decisions) decision.set(d.spectrumId, d)
  const measurementOf = new Map(measurements.map((m) => [m.spectrumId, m]))
  const suggestionOf = new Map(suggestions.map((s) => [s.spectrumId, s]))
  const standardOf = new Map<number, Standard>()
  for (const s of standards) if (!standardOf.has(s.spectrumId!) || s.retiredAt === null) standardOf.set(s.spectrumId!, s)
  const callIds = [...decision.values()].flatMap((d) => JSON.parse(d.callIds) as number[])
  const calls = callIds.length ? await ReviewCall.findAll({ where: { id: { [Op.in]: callIds } } }) : []
  const callOf = new Map(calls.map((c) => [c.id, c]))
  const names = await namesOf([...calls.map((c) => c.userId), ...[...decision.values()].map((d) => d.decidedBy)])
  const person = (id: number | null) => (id === null ? null : { id, name: names.get(id) ?? `#${id}` })

  const assessed = new Map<number, Assessment>()
  for (const sp of spectra) {
    const d = decision.get(sp.id)
    const m = measurementOf.get(sp.id)
    const s = suggestionOf.get(sp.id)
    const std = standardOf.get(sp.id)
    const no = (reason: string) => assessed.set(sp.id, { ok: false, reason })
    if (!d) {
      no('not decided yet')
      continue
    }
    const standing = (JSON.parse(d.callIds) as number[]).map((id) => callOf.get(id)).filter((c): c is ReviewCall => c !== undefined)
    const how = d.agreement === 'settled' ? 'settled' : d.agreement === 'exact' && new Set(standing.map((c) => c.userId)).size >= 2 ? 'agreed' : null
    if (how === null) {
      no('not agreed unanimously by two or more classifiers, nor settled')
      continue
    }
    const parsed = parseMK(d.spectralType)
    const v = parsed.ok ? parsed.value : null
    if (!v || v.kind !== 'mk' || v.typeCode === undefined || v.classCode === undefined || v.luminosityClass === undefined || v.composite || v.typeRange || v.classRange) {
      no('decided as something other than one MK type and class')
      continue
    }
    if (std) {
      no(std.retiredAt === null ? 'already a standard' : 'demoted earlier')
      continue
    }
    if (!m || !s || m.gridStart !== DEFAULT_GRID.start || m.gridStep !== DEFAULT_GRID.step || m.gridLength !== DEFAULT_GRID.length) {
      no('without a current measurement and suggestion')
      continue
    }
    const snr = m.snr ?? sp.snr
    if (snr === null || !(snr >= instrument.candidateMinSnr)) {
      no(`S/N below ${instrument.candidateMinSnr}`)
      continue
    }
    if ((JSON.parse(s.flags) as string[]).length > 0) {
      no('with quality flags on their suggestion')
      continue
    }
    const cell = coverageCell(v.typeCode, v.classCode)
    if (covered.has(cellKey(cell))) {
      no('in a type and class already covered')
      continue
    }
    const record: DecisionRecord = {
      classificationId: d.id,
      how,
      spectralType: d.spectralType,
      typeCode: v.typeCode,
      luminosityClass: v.luminosityClass,
      classCode: v.classCode,
      decidedAt: d.createdAt.toISOString(),
      decidedBy: person(d.decidedBy),
      calls: standing.map((c) => ({ callId: c.id, classifier: person(c.userId)!, spectralType: c.spectralType, at: c.createdAt.toISOString() })),
    }
    const details = s.details ? (JSON.parse(s.details) as { resolution?: { level?: number | null } }) : null
    assessed.set(sp.id, {
      ok: true,
      candidate: {
        spectrumId: sp.id,
        objectName: sp.objectName,
        snr: Math.round(snr * 10) / 10,
        decision: record,
        suggestion: { id: s.id, spectralType: s.spectralType, libraryVersionId: s.libraryVersionId },
        cell,
        firstInCell: false,
      },
      canonical: formatMK({ ...v, peculiarities: [], lineTypes: [], uncertain: { prefix: false, type: false, class: false } }),
      level: details?.resolution?.level ?? null,
      measurementId: m.id,
    })
  }
  // The best of each cell first: highest S/N, then the earliest spectrum.
  const byCell = new Map<string, InstrumentCandidate[]>()
  for (const a of assessed.values()) if (a.ok) byCell.set(cellKey(a.candidate.cell), [...(byCell.get(cellKey(a.candidate.cell)) ?? []), a.candidate])
  for (const list of byCell.values()) {
    list.sort((x, y) => y.snr - x.snr || x.spectrumId - y.spectrumId)
    list[0]!.firstInCell = true
  }
  return { instrument, active, members, own, coverage: [...covered.values()].sort((a, b) => a.typeCode - b.typeCode || a.classCode - b.classCode), assessed }
}

async function instrumentOrThrow(id: number): Promise<Instrument> {
  const instrument = await Instrument.findByPk(id)
  if (!instrument) throw notFound('The instrument')
  return instrument
}

/** The candidate standards of an instrument, its coverage in the active version, and why other spectra are not proposed. */
export async function instrumentCandidates(user: User, id: number): Promise<InstrumentCandidates> {
  const summary = await getInstrument(user, id)
  const state = await assess(await instrumentOrThrow(id))
  const candidates = [...state.assessed.values()]
    .flatMap((a) => (a.ok ? [a.candidate] : []))
    .sort((a, b) => a.cell.typeCode - b.cell.typeCode || a.cell.classCode - b.cell.classCode || Number(b.firstInCell) - Number(a.firstInCell) || b.snr - a.snr)
  const passed = new Map<string, number>()
  for (const a of state.assessed.values()) if (!a.ok) passed.set(a.reason, (passed.get(a.reason) ?? 0) + 1)
  return {
    instrument: summary,
    activeVersionId: state.active?.id ?? null,
    coverage: state.coverage,
    candidates,
    passedOver: [...passed].map(([reason, count]) => ({ reason, count })).sort((a, b) => b.count - a.count),
  }
}

/** A unique version name: `wanted`, or the instrument's name and the next number of its versions. */
async function versionName(instrument: Instrument, wanted: string | undefined): Promise<string> {
  if (wanted) {
    if (await LibraryVersion.findOne({ where: { name: wanted }, attributes: ['id'] })) throw new HttpError(409, 'name_taken', `A version named "${wanted}" already exists.`)
    return wanted
  }
  const count = await LibraryVersion.count({ where: { instrumentId: instrument.id } })
  for (let k = count + 1; ; k++) {
    const name = `${instrument.name.slice(0, 48)} · ${k}`
    if (!(await LibraryVersion.findOne({ where: { name }, attributes: ['id'] }))) return name
  }
}

function decisionText(d: DecisionRecord): string {
  const who = d.how === 'settled' ? `settled by ${d.decidedBy?.name ?? 'a lead'}` : `agreed unanimously by ${listNames(d.calls.map((c) => c.classifier.name))}`
  return `${who} as ${d.spectralType} on ${d.decidedAt.slice(0, 10)}`
}

/**
 * Promotes candidates of an instrument as its standards and publishes a new active version: the
 * active version's standards and the new ones. Each new standard copies the spectrum's current
 * measurement (its rectified flux at the level it was matched at, so later re-measurements do not
 * change it), takes the decided type and class, and keeps its provenance; the version records
 * what it added and why. Refused unless every spectrum is a candidate now, and two for one cell.
 */
export async function promoteCandidates(
  sequelize: Sequelize,
  lead: User,
  id: number,
  input: { spectrumIds: number[]; note: string; name?: string | undefined },
): Promise<{ version: VersionSummary; standards: StandardSummary[] }> {
  const instrument = await instrumentOrThrow(id)
  const state = await assess(instrument)
  if (!state.active) throw new HttpError(409, 'no_active_library', 'No standards library version is active.')
  const chosen = [...new Set(input.spectrumIds)]
  const picked: Extract<Assessment, { ok: true }>[] = []
  for (const spectrumId of chosen) {
    const a = state.assessed.get(spectrumId)
    if (!a) throw new HttpError(409, 'not_a_candidate', `Spectrum #${spectrumId} is not a spectrum of ${instrument.name}.`, { spectrumId })
    if (!a.ok) throw new HttpError(409, 'not_a_candidate', `Spectrum #${spectrumId} is not a candidate: ${a.reason}.`, { spectrumId, reason: a.reason })
    picked.push(a)
  }
  const cells = new Map<string, number>()
  for (const a of picked) {
    const other = cells.get(cellKey(a.candidate.cell))
    if (other !== undefined)
      throw new HttpError(409, 'same_gap', `Spectra #${other} and #${a.candidate.spectrumId} fill the same gap (${a.candidate.cell.label}); promote one of them.`, {
        spectrumIds: [other, a.candidate.spectrumId],
      })
    cells.set(cellKey(a.candidate.cell), a.candidate.spectrumId)
  }
  const name = await versionName(instrument, input.name)
  const measurements = new Map((await Measurement.findAll({ where: { id: { [Op.in]: picked.map((a) => a.measurementId) } }, attributes: ['id', 'rectified', 'mask'] })).map((m) => [m.id, m]))
  const now = new Date()
  const leadRef = { id: lead.id, name: lead.name }
  const instrumentRef = { id: instrument.id, name: instrument.name }
  const { version, created } = await sequelize.transaction(async (transaction) => {
    const made: Standard[] = []
    for (const a of picked) {
      const c = a.candidate
      const m = measurements.get(a.measurementId)!
      const rectified = bufferToFloat32(m.rectified)
      for (let i = 0; i < rectified.length; i++) if (m.mask[i] === 1) rectified[i] = Number.NaN
      const provenance: StandardProvenance = {
        instrument: instrumentRef,
        spectrumId: c.spectrumId,
        objectName: c.objectName,
        snr: c.snr,
        decision: c.decision,
        gap: c.cell.label,
        promotedBy: leadRef,
        promotedAt: now.toISOString(),
      }
      made.push(
        await Standard.create(
          {
            source: 'observed',
            modelId: null,
            spectrumId: c.spectrumId,
            star: c.objectName.slice(0, 60),
            origin: `${instrument.name}`.slice(0, 120),
            spectralType: a.canonical,
            typeCode: c.decision.typeCode,
            luminosityClass: c.decision.luminosityClass,
            classCode: c.decision.classCode,
            teff: null,
            logg: null,
            resolutionFwhm: a.level,
            note: `Promoted for ${instrument.name}: ${decisionText(c.decision)}; S/N ${c.snr}; fills ${c.cell.label}.${input.note ? ` ${input.note}` : ''}`,
            rectified: float32ToBuffer(rectified),
            addedBy: lead.id,
            retiredAt: null,
            instrumentId: instrument.id,
            provenance: JSON.stringify(provenance),
          },
          { transaction },
        ),
      )
    }
    const changes: VersionChanges = {
      action: 'promote',
      instrument: instrumentRef,
      note: input.note,
      standards: made.map((s, k) => ({
        standardId: s.id,
        spectrumId: s.spectrumId,
        spectralType: s.spectralType,
        reason: `${decisionText(picked[k]!.candidate.decision)}; S/N ${picked[k]!.candidate.snr}; fills ${picked[k]!.candidate.cell.label}`,
      })),
    }
    const description = `${made.length} agreed ${made.length === 1 ? 'spectrum' : 'spectra'} of ${instrument.name} promoted as its standards on top of ${state.active!.name}: ${picked.map((a) => `#${a.candidate.spectrumId} ${a.candidate.objectName} (${a.canonical})`).join(', ')}.${input.note ? ` ${input.note}` : ''}`
    const v = await publish(state, lead, { name, description, changes, members: [...state.members, ...made.map((s) => s.id)] }, transaction)
    return { version: v, created: made }
  })
  return { version: toVersionSummary(version, state.members.length + created.length), standards: created.map((s) => toStandardSummary(s, [version.id])) }
}

/**
 * Demotes standards of an instrument: they are retired and a new active version is published
 * without them (earlier versions keep them, so their suggestions still make sense); the version
 * records what it took out and the lead's reason.
 */
export async function demoteStandards(
  sequelize: Sequelize,
  lead: User,
  id: number,
  input: { standardIds: number[]; note: string; name?: string | undefined },
): Promise<{ version: VersionSummary; standards: StandardSummary[] }> {
  const instrument = await instrumentOrThrow(id)
  const state = await assess(instrument)
  if (!state.active) throw new HttpError(409, 'no_active_library', 'No standards library version is active.')
  const chosen = [...new Set(input.standardIds)]
  const own = new Map(state.own.map((s) => [s.id, s]))
  for (const standardId of chosen) {
    if (!own.has(standardId))
      throw new HttpError(409, 'not_a_standard', `Standard #${standardId} is not one of ${instrument.name}'s standards in the active version ${state.active.name}.`, { standardId })
  }
  const name = await versionName(instrument, input.name)
  const gone = new Set(chosen)
  const now = new Date()
  const version = await sequelize.transaction(async (transaction) => {
    await Standard.update({ retiredAt: now }, { where: { id: { [Op.in]: chosen } }, transaction })
    const changes: VersionChanges = {
      action: 'demote',
      instrument: { id: instrument.id, name: instrument.name },
      note: input.note,
      standards: chosen.map((sid) => {
        const s = own.get(sid)!
        return { standardId: s.id, spectrumId: s.spectrumId, spectralType: s.spectralType, reason: input.note }
      }),
    }
    const description = `${chosen.length} ${chosen.length === 1 ? 'standard' : 'standards'} of ${instrument.name} demoted from ${state.active!.name}: ${chosen.map((sid) => `${own.get(sid)!.spectralType}${own.get(sid)!.spectrumId !== null ? ` (#${own.get(sid)!.spectrumId})` : ''}`).join(', ')}. ${input.note}`
    return publish(state, lead, { name, description, changes, members: state.members.filter((m) => !gone.has(m)) }, transaction)
  })
  const demoted = await Standard.findAll({ where: { id: { [Op.in]: chosen } }, attributes: { exclude: ['rectified'] } })
  const links = await LibraryVersionStandard.findAll({ where: { standardId: { [Op.in]: chosen } } })
  return {
    version: toVersionSummary(version, state.members.length - chosen.length),
    standards: demoted.map((s) =>
      toStandardSummary(
        s,
        links.filter((l) => l.standardId === s.id).map((l) => l.versionId),
      ),
    ),
  }
}

async function publish(state: InstrumentState, lead: User, v: { name: string; description: string; changes: VersionChanges; members: number[] }, transaction: Transaction): Promise<LibraryVersion> {
  if (v.members.length === 0) throw new HttpError(409, 'empty_library', 'A version needs at least one standard.')
  await LibraryVersion.update({ isActive: false }, { where: { isActive: true }, transaction })
  const version = await LibraryVersion.create(
    {
      name: v.name,
      description: v.description.slice(0, 60_000),
      status: 'published',
      isActive: true,
      publishedAt: new Date(),
      publishedBy: lead.id,
      instrumentId: state.instrument.id,
      basedOnId: state.active!.id,
      changes: JSON.stringify(v.changes),
    },
    { transaction },
  )
  await LibraryVersionStandard.bulkCreate(
    v.members.map((standardId) => ({ versionId: version.id, standardId })),
    { transaction },
  )
  return version
}
