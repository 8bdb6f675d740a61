import type { Sequelize } from 'sequelize'
import { Campaign, CampaignMember } from './Campaign'
import { MailMessage } from './MailMessage'
import { Session } from './Session'
import { Spectrum, SpectrumBlob } from './Spectrum'
import { User } from './User'
import { UserToken } from './UserToken'

export { Campaign, CampaignMember, MailMessage, Session, Spectrum, SpectrumBlob, User, UserToken }
export type { TokenPurpose } from './UserToken'

/** Registers every model and association on one connection. */
export function initModels(sequelize: Sequelize): void {
  for (const model of [User, UserToken, Session, MailMessage, Campaign, CampaignMember, Spectrum, SpectrumBlob]) model.initModel(sequelize)
  UserToken.belongsTo(User, { foreignKey: 'userId', as: 'user' })
  Campaign.belongsToMany(User, { through: CampaignMember, foreignKey: 'campaignId', otherKey: 'userId', as: 'members' })
  Spectrum.belongsTo(Campaign, { foreignKey: 'campaignId', as: 'campaign' })
  Spectrum.belongsTo(User, { foreignKey: 'submittedBy', as: 'submitter' })
  Spectrum.hasOne(SpectrumBlob, { foreignKey: 'spectrumId', as: 'blob' })
  User.belongsToMany(Campaign, { through: CampaignMember, foreignKey: 'userId', otherKey: 'campaignId', as: 'campaigns' })
}
