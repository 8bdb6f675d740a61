// Runs in a worker thread of its own: the agreement audit reads every call of a campaign and its
// figures grow with them, so the whole report — reading, computing, writing the JSON — is made
// away from the thread that answers requests. The thread keeps its own database connection.
import { loadConfig } from '../config'
import { createSequelize } from '../db'
import { isDatabaseUnavailable, withRetry } from '../lib/db-errors'
import { auditReportJson, type AuditCampaignRef, type AuditWorkerResult } from '../services/audit.service'

// Made when the thread starts (defining the models takes a noticeable part of a first audit); it
// connects on the first query.
createSequelize({ ...loadConfig(process.env), DB_POOL_MAX: 3 })

export interface AuditTask {
  campaign: AuditCampaignRef
  campaignId: number
  from: string | null
  to: string | null
}

export default async function report(task: AuditTask): Promise<AuditWorkerResult> {
  const query = { campaignId: task.campaignId, from: task.from ? new Date(task.from) : undefined, to: task.to ? new Date(task.to) : undefined }
  try {
    // A connection dropped or refused for a moment is tried again before the lead is told.
    return await withRetry(() => auditReportJson(query, task.campaign), { tries: 3, baseMs: 100 })
  } catch (error) {
    if (isDatabaseUnavailable(error)) return { databaseUnavailable: (error as Error).message }
    throw error
  }
}
