import type { AppContext } from '../context'
import { currentUser } from '../middleware/auth'
import { createCampaignBody, memberBody, memberParams, membersBody, updateCampaignBody } from '../schemas/campaigns.schemas'
import { idParams } from '../schemas/common'
import { addCampaignMember, createCampaign, getCampaign, listCampaignsFor, removeCampaignMember, setCampaignMembers, updateCampaign } from '../services/campaigns.service'
import { hrDiagram } from '../services/hr.service'
import { LEAD, defineRoutes } from './route'

export function campaignRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/campaigns',
      access: 'signed-in',
      handler: async (req, res) => {
        res.json({ campaigns: await listCampaignsFor(currentUser(req)) })
      },
    },
    {
      method: 'post',
      path: '/campaigns',
      access: LEAD,
      schema: { body: createCampaignBody },
      handler: async (req, res) => {
        res.status(201).json({ campaign: await createCampaign(currentUser(req), res.locals.body) })
      },
    },
    {
      method: 'get',
      path: '/campaigns/:id',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json({ campaign: await getCampaign(currentUser(req), res.locals.params.id) })
      },
    },
    {
      method: 'get',
      path: '/campaigns/:id/hr',
      access: LEAD,
      schema: { params: idParams },
      handler: async (_req, res) => {
        res.json({ hr: await hrDiagram(res.locals.params.id) })
      },
    },
    {
      method: 'patch',
      path: '/campaigns/:id',
      access: LEAD,
      schema: { params: idParams, body: updateCampaignBody },
      handler: async (req, res) => {
        res.json({ campaign: await updateCampaign(currentUser(req), res.locals.params.id, res.locals.body) })
      },
    },
    {
      method: 'put',
      path: '/campaigns/:id/members',
      access: LEAD,
      schema: { params: idParams, body: membersBody },
      handler: async (req, res) => {
        res.json({ campaign: await setCampaignMembers(ctx, currentUser(req), res.locals.params.id, res.locals.body.userIds) })
      },
    },
    {
      method: 'post',
      path: '/campaigns/:id/members',
      access: LEAD,
      schema: { params: idParams, body: memberBody },
      handler: async (req, res) => {
        res.json({ campaign: await addCampaignMember(currentUser(req), res.locals.params.id, res.locals.body.userId) })
      },
    },
    {
      method: 'delete',
      path: '/campaigns/:id/members/:userId',
      access: LEAD,
      schema: { params: memberParams },
      handler: async (req, res) => {
        res.json({ campaign: await removeCampaignMember(currentUser(req), res.locals.params.id, res.locals.params.userId) })
      },
    },
  ])
}
