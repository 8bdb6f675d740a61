// Runs in a worker thread: the audit's figures grow with the stored calls, so they are computed
// away from the thread that answers requests.
import { auditFigures, type AuditCall, type AuditFigures, type AuditSpectrum } from '../services/audit.service'

export default function figures(task: { calls: AuditCall[]; spectra: AuditSpectrum[] }): AuditFigures {
  return auditFigures(task.calls, task.spectra)
}
