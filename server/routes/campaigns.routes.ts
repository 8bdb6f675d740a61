import { campaignsApi } from '../../shared/api/campaigns'
import type { AppContext } from '../context'
import { addCampaignMember, createCampaign, getCampaign, listCampaignsFor, removeCampaignMember, setCampaignMembers, updateCampaign } from '../services/campaigns.service'
import { hrDiagram } from '../services/hr.service'
import { LEAD, route } from './route'

export function campaignRoutes(ctx: AppContext) {
  return [
    route(campaignsApi.list, { access: 'signed-in', handler: async ({ user }) => ({ campaigns: await listCampaignsFor(user) }) }),
    route(campaignsApi.create, { access: LEAD, handler: async ({ body, user }) => ({ campaign: await createCampaign(user, body) }) }),
    route(campaignsApi.get, { access: 'signed-in', handler: async ({ params, user }) => ({ campaign: await getCampaign(user, params.id) }) }),
    route(campaignsApi.hr, { access: LEAD, handler: async ({ params }) => ({ hr: await hrDiagram(params.id) }) }),
    route(campaignsApi.update, { access: LEAD, handler: async ({ params, body, user }) => ({ campaign: await updateCampaign(user, params.id, body) }) }),
    route(campaignsApi.setMembers, { access: LEAD, handler: async ({ params, body, user }) => ({ campaign: await setCampaignMembers(ctx, user, params.id, body.userIds) }) }),
    route(campaignsApi.addMember, { access: LEAD, handler: async ({ params, body, user }) => ({ campaign: await addCampaignMember(user, params.id, body.userId) }) }),
    route(campaignsApi.removeMember, { access: LEAD, handler: async ({ params, user }) => ({ campaign: await removeCampaignMember(user, params.id, params.userId) }) }),
  ]
}
