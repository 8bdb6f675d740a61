import type { Sequelize } from 'sequelize'
import type { Config } from '../config'
import { Campaign, CampaignMember, User } from '../models'
import { hashPassword } from '../services/users.service'

/** The invented demo scenario: one observatory, one campaign, one person per role (and a second classifier). */
export const DEMO_PEOPLE = [
  { email: 'lead@kestrel-ridge.example', name: 'Maren Olukoya', role: 'lead', password: 'lead-demo-2026' },
  { email: 'classifier@kestrel-ridge.example', name: 'Ilse Varga', role: 'classifier', password: 'classifier-demo-2026' },
  { email: 'classifier2@kestrel-ridge.example', name: 'Tomasz Achterberg', role: 'classifier', password: 'classifier2-demo-2026' },
  { email: 'observer@kestrel-ridge.example', name: 'Rohan Delacroix', role: 'observer', password: 'observer-demo-2026' },
] as const

export const DEMO_OBSERVATORY = 'Kestrel Ridge Observatory'

export const DEMO_CAMPAIGN_CODE = 'KRO-NFS26'

/** Seeds once: a database that already holds the demo campaign is left as it is. Returns whether it seeded. */
export async function seedDemo(sequelize: Sequelize, config: Config): Promise<boolean> {
  if (await Campaign.findOne({ where: { code: DEMO_CAMPAIGN_CODE } })) return false
  await sequelize.transaction(async (transaction) => {
    const campaign = await Campaign.create(
      {
        code: DEMO_CAMPAIGN_CODE,
        name: 'Northern Fields Survey 2026',
        description: 'Low-resolution classification spectra of field stars taken with the 1.1 m telescope at Kestrel Ridge.',
        observatory: DEMO_OBSERVATORY,
        callsRequired: 2,
        blindReview: true,
      },
      { transaction },
    )
    for (const p of DEMO_PEOPLE) {
      const user = await User.create(
        { email: p.email, name: p.name, role: p.role, passwordHash: await hashPassword(p.password, config.BCRYPT_ROUNDS), lastLoginAt: null },
        { transaction },
      )
      await CampaignMember.create({ campaignId: campaign.id, userId: user.id }, { transaction })
    }
  })
  return true
}
