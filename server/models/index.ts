import type { Sequelize } from 'sequelize'
import { ApiToken } from './ApiToken'
import { Campaign, CampaignMember } from './Campaign'
import { Instrument } from './Instrument'
import { MailMessage } from './MailMessage'
import { LineMeasurementRow, Measurement, ProcessingJob } from './Measurement'
import { Release, ReleaseRow } from './Release'
import { Classification, Dispute, DisputeAction, ReviewCall, ReviewClaim } from './Review'
import { Session } from './Session'
import { Spectrum, SpectrumBlob, SpectrumEvent } from './Spectrum'
import { LibraryVersion, LibraryVersionStandard, Standard, Suggestion } from './Standard'
import { User } from './User'
import { UserToken } from './UserToken'

export { LibraryVersion, LibraryVersionStandard, Standard, Suggestion }
export { ApiToken, Campaign, CampaignMember, Instrument, LineMeasurementRow, MailMessage, Measurement, ProcessingJob, Session, Spectrum, SpectrumBlob, SpectrumEvent, User, UserToken }
export type { SpectrumEventKind } from './Spectrum'
export type { JobStatus } from './Measurement'
export { Classification, Dispute, DisputeAction, ReviewCall, ReviewClaim }
export { Release, ReleaseRow }
export type { Agreement, CallKind, ClassificationSource } from './Review'
export type { TokenPurpose } from './UserToken'

/** Registers every model and association on one connection. */
export function initModels(sequelize: Sequelize): void {
  for (const model of [
    User,
    UserToken,
    ApiToken,
    Session,
    MailMessage,
    Campaign,
    CampaignMember,
    Instrument,
    Spectrum,
    SpectrumBlob,
    SpectrumEvent,
    ProcessingJob,
    Measurement,
    LineMeasurementRow,
    LibraryVersion,
    Standard,
    LibraryVersionStandard,
    Suggestion,
    ReviewClaim,
    ReviewCall,
    Dispute,
    DisputeAction,
    Classification,
    Release,
    ReleaseRow,
  ])
    model.initModel(sequelize)
  UserToken.belongsTo(User, { foreignKey: 'userId', as: 'user' })
  ApiToken.belongsTo(User, { foreignKey: 'userId', as: 'owner' })
  Campaign.belongsToMany(User, { through: CampaignMember, foreignKey: 'campaignId', otherKey: 'userId', as: 'members' })
  Spectrum.belongsTo(Campaign, { foreignKey: 'campaignId', as: 'campaign' })
  Spectrum.belongsTo(User, { foreignKey: 'submittedBy', as: 'submitter' })
  Spectrum.hasOne(SpectrumBlob, { foreignKey: 'spectrumId', as: 'blob' })
  Measurement.hasMany(LineMeasurementRow, { foreignKey: 'measurementId', as: 'lines' })
  LibraryVersion.belongsToMany(Standard, { through: LibraryVersionStandard, foreignKey: 'versionId', otherKey: 'standardId', as: 'standards' })
  Standard.belongsToMany(LibraryVersion, { through: LibraryVersionStandard, foreignKey: 'standardId', otherKey: 'versionId', as: 'versions' })
  User.belongsToMany(Campaign, { through: CampaignMember, foreignKey: 'userId', otherKey: 'campaignId', as: 'campaigns' })
}
