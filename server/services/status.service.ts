import { Op } from 'sequelize'
import { ProcessingJob, type User } from '../models'
import { findVisibleSpectrum } from './visibility'
import type { SpectrumLiveStatus } from '../../shared/api/status'

export type { SpectrumLiveStatus }

/**
 * The spectrum's status and its processing job: running, or queued with its place in line (1 = next:
 * queued jobs are taken oldest first).
 */
export async function liveStatus(user: User, spectrumId: number): Promise<SpectrumLiveStatus> {
  const spectrum = await findVisibleSpectrum(user, spectrumId)
  const job = await ProcessingJob.findOne({ where: { spectrumId, status: { [Op.in]: ['queued', 'running'] } }, order: [['id', 'DESC']] })
  let state: SpectrumLiveStatus['job'] = null
  if (job?.status === 'running') state = { state: 'running' }
  else if (job) {
    const [ahead, ofQueued] = await Promise.all([ProcessingJob.count({ where: { status: 'queued', id: { [Op.lt]: job.id } } }), ProcessingJob.count({ where: { status: 'queued' } })])
    state = { state: 'queued', position: ahead + 1, ofQueued }
  }
  return { id: spectrum.id, status: spectrum.status, statusReason: spectrum.statusReason, job: state }
}
