import { Op } from 'sequelize'
import { notFound } from '../lib/http-error'
import { Campaign, Classification, Spectrum, Suggestion } from '../models'
import { MIN_CLASS_UNCERTAINTY, MIN_TYPE_UNCERTAINTY, decisionUncertainty, estimatesFor, observerInputs } from './derived.service'
import type { HrDiagram, HrPoint } from '../../shared/api/campaigns'

const LN10 = Math.log(10)

/**
 * The campaign's HR diagram: for each suggested or decided spectrum, log L/L☉ against log Teff from
 * the calibrations (shared/derived.ts), from its decided classification or else its suggestion, with
 * the uncertainties carried into log space (σ_log x = σ_x / (x ln 10)). For leads, who see every
 * suggestion; blind review does not apply to them.
 */
export async function hrDiagram(campaignId: number): Promise<HrDiagram> {
  const campaign = await Campaign.findByPk(campaignId)
  if (!campaign) throw notFound('The campaign')
  const spectra = await Spectrum.findAll({
    where: { campaignId, status: { [Op.in]: ['suggested', 'under_review', 'agreed', 'disputed', 'settled'] } },
    attributes: ['id', 'objectName', 'status', 'vMag', 'ebv', 'parallaxMas', 'parallaxErrorMas'],
    order: [['id', 'ASC']],
  })
  const ids = spectra.map((s) => s.id)
  const latest = new Map<number, Classification>()
  if (ids.length) for (const c of await Classification.findAll({ where: { spectrumId: { [Op.in]: ids } }, order: [['id', 'ASC']] })) latest.set(c.spectrumId, c)
  const suggestions = ids.length
    ? await Suggestion.findAll({
        where: { spectrumId: { [Op.in]: ids }, isCurrent: true },
        attributes: ['id', 'spectrumId', 'spectralType', 'uncertaintySubtypes', 'uncertaintyClasses'],
        order: [['id', 'ASC']],
      })
    : []
  const suggestionOf = new Map(suggestions.map((s) => [s.spectrumId, s]))
  const byId = new Map(suggestions.map((s) => [s.id, s]))

  const points: HrPoint[] = []
  let left = 0
  for (const s of spectra) {
    const decided = latest.get(s.id)
    const sug = suggestionOf.get(s.id)
    let basis: { source: 'classification' | 'suggestion'; spectralType: string; typeUncertainty: number; classUncertainty: number } | null = null
    if (decided) {
      const u = decisionUncertainty(decided, decided.suggestionId ? (byId.get(decided.suggestionId) ?? null) : null)
      basis = { source: 'classification', spectralType: decided.spectralType, typeUncertainty: u.type, classUncertainty: u.class }
    } else if (sug) {
      basis = {
        source: 'suggestion',
        spectralType: sug.spectralType,
        typeUncertainty: Math.max(MIN_TYPE_UNCERTAINTY, sug.uncertaintySubtypes),
        classUncertainty: Math.max(MIN_CLASS_UNCERTAINTY, sug.uncertaintyClasses),
      }
    }
    const d = basis ? estimatesFor(basis, observerInputs(s)) : null
    if (!basis || !d || !d.ok) {
      left++
      continue
    }
    const t = d.teff
    const l = d.luminositySolar
    points.push({
      spectrumId: s.id,
      objectName: s.objectName,
      status: s.status,
      spectralType: basis.spectralType,
      basis: basis.source,
      logTeff: Math.log10(t.value),
      logL: Math.log10(l.value),
      eLogTeff: t.uncertainty / (t.value * LN10),
      eLogL: l.uncertainty / (l.value * LN10),
    })
  }
  return { campaign: { id: campaign.id, code: campaign.code, name: campaign.name }, points, left }
}
