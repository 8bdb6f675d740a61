import { Op, type WhereOptions } from 'sequelize'
import { notFound } from '../lib/http-error'
import { Spectrum, type User } from '../models'
import { campaignIdsOf } from './campaigns.service'

/** Which spectra a user may see: observers their own, classifiers their campaigns', leads all. */
export async function visibilityWhere(user: User): Promise<WhereOptions<Spectrum>> {
  if (user.role === 'observer') return { submittedBy: user.id }
  const ids = await campaignIdsOf(user)
  return ids === 'all' ? {} : { campaignId: { [Op.in]: ids } }
}

export async function findVisibleSpectrum(user: User, id: number): Promise<Spectrum> {
  const spectrum = await Spectrum.findOne({ where: { [Op.and]: [{ id }, await visibilityWhere(user)] } })
  if (!spectrum) throw notFound('The spectrum')
  return spectrum
}
