import { z } from 'zod'
import { CAMPAIGN_REGION_LIMITS } from '../grid'
import { ROLES } from '../roles'
import { CampaignRef, id, idParams, multiLine, singleLine } from './common'
import { endpoint } from './endpoint'

/** How far a campaign's review has come: spectra counted by state. */
export const CampaignProgress = z
  .object({
    total: z.number().int(),
    /** Received or measured, not yet suggested. */
    processing: z.number().int(),
    /** Suggested, waiting for a first call. */
    waiting: z.number().int(),
    underReview: z.number().int(),
    agreed: z.number().int(),
    disputed: z.number().int(),
    settled: z.number().int(),
    failed: z.number().int(),
    /** Calls recorded on the campaign's spectra, corrections included. */
    calls: z.number().int(),
  })
  .meta({ id: 'CampaignProgress' })
export type CampaignProgress = z.infer<typeof CampaignProgress>

/** A campaign as GET /api/campaigns shows it. */
export const CampaignSummary = z
  .object({
    id: z.number().int(),
    code: z.string(),
    name: z.string(),
    description: z.string(),
    observatory: z.string(),
    regionMin: z.number(),
    regionMax: z.number(),
    callsRequired: z.number().int(),
    blindReview: z.boolean(),
    typeTolerance: z.number(),
    classTolerance: z.number(),
    /** Optional target date of the review, YYYY-MM-DD. */
    deadline: z.string().nullable(),
    /** Spectra by where they stand (for campaign lists). */
    progress: CampaignProgress.optional(),
  })
  .meta({ id: 'CampaignSummary' })
export type CampaignSummary = z.infer<typeof CampaignSummary>

/** One spectrum of a campaign on the HR diagram: derived log L against log Teff. */
export const HrPoint = z.object({
  spectrumId: z.number().int(),
  objectName: z.string(),
  status: z.string(),
  spectralType: z.string(),
  /** What the position is worked out from: the decided classification, or (before a decision) the suggestion. */
  basis: z.enum(['classification', 'suggestion']),
  logTeff: z.number(),
  logL: z.number(),
  eLogTeff: z.number(),
  eLogL: z.number(),
})
export type HrPoint = z.infer<typeof HrPoint>

export const HrDiagram = z
  .object({
    campaign: CampaignRef,
    points: z.array(HrPoint),
    /** Spectra that have no position (outside the MK grid, or nothing to derive from). */
    left: z.number().int(),
  })
  .meta({ id: 'HrDiagram' })
export type HrDiagram = z.infer<typeof HrDiagram>

export const CampaignMemberSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  role: z.enum(ROLES),
  active: z.boolean(),
  /** Only leads see addresses. */
  email: z.string().optional(),
})
export type CampaignMemberSummary = z.infer<typeof CampaignMemberSummary>

export const CampaignDetail = CampaignSummary.extend({ members: z.array(CampaignMemberSummary), createdAt: z.string(), updatedAt: z.string() }).meta({ id: 'CampaignDetail' })
export type CampaignDetail = z.infer<typeof CampaignDetail>

const regionEdge = z.number().min(CAMPAIGN_REGION_LIMITS[0], `must be at least ${CAMPAIGN_REGION_LIMITS[0]} Å`).max(CAMPAIGN_REGION_LIMITS[1], `must be at most ${CAMPAIGN_REGION_LIMITS[1]} Å`)

const rules = {
  name: singleLine(160).pipe(z.string().min(1, 'is required')),
  description: multiLine(4000),
  observatory: singleLine(160),
  regionMin: regionEdge,
  regionMax: regionEdge,
  callsRequired: z.number().int('must be a whole number').min(1, 'must be 1, 2 or 3').max(3, 'must be 1, 2 or 3'),
  blindReview: z.boolean(),
  typeTolerance: z.number().min(0, 'must be 0 or more subtypes').max(10, 'must be at most 10 subtypes'),
  classTolerance: z.number().min(0, 'must be 0 or more classes').max(3, 'must be at most 3 classes'),
  deadline: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date, YYYY-MM-DD')
    .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) && new Date(`${d}T00:00:00Z`).toISOString().startsWith(d), 'is not a calendar date')
    .nullable(),
}

const regionOrdered = (v: { regionMin?: number | undefined; regionMax?: number | undefined }) => v.regionMin === undefined || v.regionMax === undefined || v.regionMin < v.regionMax
const regionMessage = { message: 'the region must start below where it ends', path: ['regionMax'] }

export const CreateCampaignInput = z
  .object({
    code: z
      .string()
      .trim()
      .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,31}$/, 'letters, digits, - and _, at most 32'),
    name: rules.name,
    description: rules.description.default(''),
    observatory: rules.observatory.default(''),
    regionMin: rules.regionMin.optional(),
    regionMax: rules.regionMax.optional(),
    callsRequired: rules.callsRequired.default(1),
    blindReview: rules.blindReview.default(false),
    typeTolerance: rules.typeTolerance.default(1),
    classTolerance: rules.classTolerance.default(1),
    deadline: rules.deadline.default(null),
  })
  .refine(regionOrdered, regionMessage)
export type CreateCampaignInput = z.infer<typeof CreateCampaignInput>

export const UpdateCampaignInput = z
  .object({
    name: rules.name.optional(),
    description: rules.description.optional(),
    observatory: rules.observatory.optional(),
    regionMin: rules.regionMin.optional(),
    regionMax: rules.regionMax.optional(),
    callsRequired: rules.callsRequired.optional(),
    blindReview: rules.blindReview.optional(),
    typeTolerance: rules.typeTolerance.optional(),
    classTolerance: rules.classTolerance.optional(),
    deadline: rules.deadline.optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'nothing to change')
  .refine(regionOrdered, regionMessage)
export type UpdateCampaignInput = z.infer<typeof UpdateCampaignInput>

const campaignReply = z.object({ campaign: CampaignDetail })

export const campaignsApi = {
  list: endpoint({
    method: 'get',
    path: '/campaigns',
    tag: 'Campaigns',
    summary: 'The campaigns the caller takes part in (leads: all), with their progress',
    response: z.object({ campaigns: z.array(CampaignSummary) }),
  }),
  create: endpoint({ method: 'post', path: '/campaigns', tag: 'Campaigns', summary: 'Create a campaign', body: CreateCampaignInput, status: 201, response: campaignReply }),
  get: endpoint({ method: 'get', path: '/campaigns/:id', tag: 'Campaigns', summary: 'One campaign with its people', params: idParams, response: campaignReply }),
  hr: endpoint({ method: 'get', path: '/campaigns/:id/hr', tag: 'Campaigns', summary: "The campaign's HR diagram from derived parameters", params: idParams, response: z.object({ hr: HrDiagram }) }),
  update: endpoint({ method: 'patch', path: '/campaigns/:id', tag: 'Campaigns', summary: "Change a campaign's settings", params: idParams, body: UpdateCampaignInput, response: campaignReply }),
  setMembers: endpoint({
    method: 'put',
    path: '/campaigns/:id/members',
    tag: 'Campaigns',
    summary: "Replace the campaign's people with exactly these",
    params: idParams,
    body: z.object({ userIds: z.array(z.number().int().positive()).max(1000) }),
    response: campaignReply,
  }),
  addMember: endpoint({
    method: 'post',
    path: '/campaigns/:id/members',
    tag: 'Campaigns',
    summary: 'Add one person to the campaign',
    params: idParams,
    body: z.object({ userId: z.number().int().positive() }),
    response: campaignReply,
  }),
  removeMember: endpoint({
    method: 'delete',
    path: '/campaigns/:id/members/:userId',
    tag: 'Campaigns',
    summary: 'Remove one person from the campaign',
    params: z.object({ id, userId: id }),
    response: campaignReply,
  }),
}
