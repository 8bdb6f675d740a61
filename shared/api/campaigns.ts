import type { Role } from '../roles'

/** A campaign as GET /api/campaigns shows it. */
export interface CampaignSummary {
  id: number
  code: string
  name: string
  description: string
  observatory: string
  regionMin: number
  regionMax: number
  callsRequired: number
  blindReview: boolean
  typeTolerance: number
  classTolerance: number
  /** Optional target date of the review, YYYY-MM-DD. */
  deadline: string | null
  /** Spectra by where they stand (for campaign lists). */
  progress?: CampaignProgress
}

/** How far a campaign's review has come: spectra counted by state. */
export interface CampaignProgress {
  total: number
  /** Received or measured, not yet suggested. */
  processing: number
  /** Suggested, waiting for a first call. */
  waiting: number
  underReview: number
  agreed: number
  disputed: number
  settled: number
  failed: number
  /** Calls recorded on the campaign's spectra, corrections included. */
  calls: number
}

/** One spectrum of a campaign on the HR diagram: derived log L against log Teff. */
export interface HrPoint {
  spectrumId: number
  objectName: string
  status: string
  spectralType: string
  /** What the position is worked out from: the decided classification, or (before a decision) the suggestion. */
  basis: 'classification' | 'suggestion'
  logTeff: number
  logL: number
  eLogTeff: number
  eLogL: number
}

export interface HrDiagram {
  campaign: { id: number; code: string; name: string }
  points: HrPoint[]
  /** Spectra that have no position (outside the MK grid, or nothing to derive from). */
  left: number
}

export interface CampaignMemberSummary {
  id: number
  name: string
  role: Role
  active: boolean
  /** Only leads see addresses. */
  email?: string
}

export interface CampaignDetail extends CampaignSummary {
  members: CampaignMemberSummary[]
  createdAt: string
  updatedAt: string
}
