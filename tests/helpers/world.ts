import { randomBytes } from 'node:crypto'
import type { Express } from 'express'
import { CATALOGUE_COLUMNS, type ExportRow } from '../../server/exports'
import { Campaign, CampaignMember, LibraryVersion, Release, ReleaseRow, type Spectrum } from '../../server/models'
import { ensureDefaultLibrary } from '../../server/services/standards.service'
import type { Sequelize } from 'sequelize'
import { createSuggestedSpectrum, signedInPerson, type Person } from './review'

export async function makeCampaign(label: string, members: Person[] = []) {
  const campaign = await Campaign.create({ code: `${label}-${randomBytes(3).toString('hex')}`, name: `${label} fields`, description: '' })
  for (const m of members) await CampaignMember.create({ campaignId: campaign.id, userId: m.user.id })
  return campaign
}

/** A suggested spectrum (no arrays, no file) in the campaign. */
export async function suggested(sequelize: Sequelize, campaign: Campaign, submitter: Person, objectName = `Field star ${randomBytes(2).toString('hex')}`): Promise<Spectrum> {
  await ensureDefaultLibrary(sequelize)
  const library = (await LibraryVersion.findOne({ where: { isActive: true } }))!
  const { spectrum } = await createSuggestedSpectrum({
    campaignId: campaign.id,
    submittedBy: submitter.user.id,
    libraryVersionId: library.id,
    objectName,
    snr: 50,
    instrument: 'test spectrograph',
    type: ['B', 'III', 8, 18, 4],
    candidates: '[]',
    votes: '[]',
    flags: '[]',
  })
  return spectrum
}

/** A frozen release of the campaign holding these rows (columns not given are empty). */
export async function frozenRelease(campaign: Campaign, lead: Person, rows: Array<Partial<ExportRow> & { SpId: number; Object: string }>): Promise<Release> {
  const version = (((await Release.max('version', { where: { campaignId: campaign.id } })) as number | null) ?? 0) + 1
  const release = await Release.create({
    campaignId: campaign.id,
    version,
    title: `${campaign.code} release ${version}`,
    description: '',
    rowCount: rows.length,
    columns: JSON.stringify(CATALOGUE_COLUMNS),
    params: '[]',
    notes: '[]',
    createdBy: lead.user.id,
  })
  await ReleaseRow.bulkCreate(
    rows.map((r, i) => ({
      releaseId: release.id,
      position: i + 1,
      spectrumId: r.SpId,
      cells: JSON.stringify({ ...Object.fromEntries(CATALOGUE_COLUMNS.map((c) => [c.name, null])), Ncalls: 1, ...r }),
    })),
  )
  return release
}

/**
 * Two campaigns with their own people: A holds an observer's suggested spectrum and a release;
 * B's people are members of B only.
 */
export async function twoCampaigns(app: Express, sequelize: Sequelize) {
  const lead = await signedInPerson(app, 'lead', 'Lena Lead')
  const observer = await signedInPerson(app, 'observer', 'Omar Owner')
  const observerSameCampaign = await signedInPerson(app, 'observer', 'Olga Colleague')
  const classifier = await signedInPerson(app, 'classifier', 'Cora Member')
  const observerB = await signedInPerson(app, 'observer', 'Oskar Outsider')
  const classifierB = await signedInPerson(app, 'classifier', 'Carl Outsider')
  const a = await makeCampaign('A', [observer, observerSameCampaign, classifier])
  const b = await makeCampaign('B', [observerB, classifierB])
  const spectrum = await suggested(sequelize, a, observer, 'HD 1 in A')
  const release = await frozenRelease(a, lead, [{ SpId: spectrum.id, Object: 'HD 1 in A', SpType: 'B8 III', DecidedBy: 'Cora Member' }])
  return { lead, observer, observerSameCampaign, classifier, observerB, classifierB, a, b, spectrum, release }
}
