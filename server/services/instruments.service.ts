import { Op, UniqueConstraintError, type Transaction } from 'sequelize'
import { HttpError, notFound } from '../lib/http-error'
import { Campaign, Instrument, LibraryVersion, LibraryVersionStandard, Spectrum, Standard, type User } from '../models'
import type { CreateInstrumentInput, UpdateInstrumentInput } from '../../shared/api/instruments'
import type { InstrumentSummary } from '../../shared/api/instruments'
import { campaignIdsOf } from './campaigns.service'

export type { InstrumentSummary }

/** The instruments of the campaigns the user belongs to (leads: every campaign), with their spectra and standards counted. */
export async function listInstruments(user: User, campaignId?: number): Promise<InstrumentSummary[]> {
  const ids = await campaignIdsOf(user)
  if (campaignId !== undefined && ids !== 'all' && !ids.includes(campaignId)) throw notFound('The campaign')
  const where = campaignId !== undefined ? { campaignId } : ids === 'all' ? {} : { campaignId: { [Op.in]: ids } }
  const instruments = await Instrument.findAll({
    where,
    order: [
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
  })
  return summaries(instruments)
}

/** One instrument, if the user may see its campaign. */
export async function getInstrument(user: User, id: number): Promise<InstrumentSummary> {
  const instrument = await Instrument.findByPk(id)
  const ids = await campaignIdsOf(user)
  if (!instrument || (ids !== 'all' && !ids.includes(instrument.campaignId))) throw notFound('The instrument')
  return (await summaries([instrument]))[0]!
}

export async function summaries(instruments: Instrument[]): Promise<InstrumentSummary[]> {
  if (instruments.length === 0) return []
  const ids = instruments.map((i) => i.id)
  const [campaigns, spectra, active] = await Promise.all([
    Campaign.findAll({ where: { id: { [Op.in]: [...new Set(instruments.map((i) => i.campaignId))] } }, attributes: ['id', 'code', 'name'] }),
    Spectrum.count({ where: { instrumentId: { [Op.in]: ids } }, group: ['instrumentId'] }) as unknown as Promise<{ instrumentId: number; count: number }[]>,
    LibraryVersion.findOne({ where: { isActive: true }, attributes: ['id'] }),
  ])
  const standards = new Map<number, number>()
  if (active) {
    const members = (await LibraryVersionStandard.findAll({ where: { versionId: active.id }, attributes: ['standardId'] })).map((l) => l.standardId)
    const own = members.length ? await Standard.findAll({ where: { id: { [Op.in]: members }, instrumentId: { [Op.in]: ids } }, attributes: ['instrumentId'] }) : []
    for (const s of own) standards.set(s.instrumentId!, (standards.get(s.instrumentId!) ?? 0) + 1)
  }
  const spectraOf = new Map(spectra.map((r) => [Number(r.instrumentId), Number(r.count)]))
  const campaignOf = new Map(campaigns.map((c) => [c.id, { id: c.id, code: c.code, name: c.name }]))
  return instruments.map((i) => ({
    id: i.id,
    campaign: campaignOf.get(i.campaignId) ?? { id: i.campaignId, code: '', name: '' },
    name: i.name,
    resolutionFwhm: i.resolutionFwhm,
    wavelengthRange: i.wlMin !== null && i.wlMax !== null ? [i.wlMin, i.wlMax] : null,
    candidateMinSnr: i.candidateMinSnr,
    notes: i.notes,
    spectra: spectraOf.get(i.id) ?? 0,
    standards: standards.get(i.id) ?? 0,
    createdAt: i.createdAt.toISOString(),
    updatedAt: i.updatedAt.toISOString(),
  }))
}

function checkRange(min: number | null, max: number | null): void {
  if ((min === null) !== (max === null))
    throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { [min === null ? 'wavelengthMin' : 'wavelengthMax']: 'give both ends of the coverage, or neither' } })
  if (min !== null && max !== null && min >= max) throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { wavelengthMax: 'the coverage must start below where it ends' } })
}

const nameTaken = (name: string) => new HttpError(409, 'conflict', `This campaign already has an instrument named "${name}".`, { fields: { name: 'is already taken in this campaign' } })

/** A new instrument of a campaign (leads). */
export async function createInstrument(lead: User, input: CreateInstrumentInput): Promise<InstrumentSummary> {
  const campaign = await Campaign.findByPk(input.campaignId, { attributes: ['id'] })
  if (!campaign) throw notFound('The campaign')
  const wlMin = input.wavelengthMin ?? null
  const wlMax = input.wavelengthMax ?? null
  checkRange(wlMin, wlMax)
  try {
    const instrument = await Instrument.create({
      campaignId: campaign.id,
      name: input.name,
      resolutionFwhm: input.resolutionFwhm ?? null,
      wlMin,
      wlMax,
      ...(input.candidateMinSnr !== undefined ? { candidateMinSnr: input.candidateMinSnr } : {}),
      notes: input.notes ?? '',
      createdBy: lead.id,
    })
    return (await summaries([instrument]))[0]!
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw nameTaken(input.name)
    throw error
  }
}

/**
 * Changes an instrument (leads). A new resolution applies to the spectra processed from then on
 * (re-suggest the campaign to apply it to the others); standards already promoted keep theirs.
 */
export async function updateInstrument(id: number, input: UpdateInstrumentInput): Promise<InstrumentSummary> {
  const instrument = await Instrument.findByPk(id)
  if (!instrument) throw notFound('The instrument')
  const wlMin = input.wavelengthMin !== undefined ? input.wavelengthMin : instrument.wlMin
  const wlMax = input.wavelengthMax !== undefined ? input.wavelengthMax : instrument.wlMax
  checkRange(wlMin, wlMax)
  const changes: Partial<Instrument> = { wlMin, wlMax }
  if (input.name !== undefined) changes.name = input.name
  if (input.resolutionFwhm !== undefined) changes.resolutionFwhm = input.resolutionFwhm
  if (input.candidateMinSnr !== undefined) changes.candidateMinSnr = input.candidateMinSnr
  if (input.notes !== undefined) changes.notes = input.notes
  try {
    await instrument.update(changes)
  } catch (error) {
    if (error instanceof UniqueConstraintError) throw nameTaken(input.name ?? instrument.name)
    throw error
  }
  return (await summaries([instrument]))[0]!
}

/**
 * The instrument a new spectrum of `campaignId` is taken with: the one chosen (it must belong to
 * the campaign), else the campaign's instrument whose name is the setup the observer or the file
 * header gave (letter case aside), else none.
 */
export async function instrumentForSpectrum(campaignId: number, chosen: number | null | undefined, setup: string | undefined, transaction?: Transaction): Promise<Instrument | null> {
  if (chosen !== undefined && chosen !== null) {
    const instrument = await Instrument.findByPk(chosen, { transaction })
    if (!instrument || instrument.campaignId !== campaignId) {
      throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { instrumentId: 'is not an instrument of this campaign' } })
    }
    return instrument
  }
  const text = setup?.trim().toLowerCase()
  if (!text) return null
  const all = await Instrument.findAll({ where: { campaignId }, transaction })
  return all.find((i) => i.name.trim().toLowerCase() === text) ?? null
}
