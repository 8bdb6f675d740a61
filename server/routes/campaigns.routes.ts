import { currentUser } from '../middleware/auth'
import { listCampaignsFor } from '../services/campaigns.service'
import { defineRoutes } from './route'

export function campaignRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/campaigns',
      access: 'signed-in',
      handler: async (req, res) => {
        res.json({ campaigns: await listCampaignsFor(currentUser(req)) })
      },
    },
  ])
}
