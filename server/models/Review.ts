import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Agreement, CallKind, ClassificationSource } from '../../shared/api/review'

export type { Agreement, CallKind, ClassificationSource }

/** Calls, disputes and classifications are history: written once, never changed or removed. */
const writeOnce = (what: string) => {
  const refuse = () => {
    throw new Error(`${what} are kept as written; record a new row instead.`)
  }
  return { beforeUpdate: refuse, beforeBulkUpdate: refuse, beforeDestroy: refuse, beforeBulkDestroy: refuse }
}

/** A classifier working a queue item; lapses by itself at expiresAt. One row per spectrum. */
export class ReviewClaim extends Model<InferAttributes<ReviewClaim>, InferCreationAttributes<ReviewClaim>> {
  declare spectrumId: number
  declare userId: number
  declare claimedAt: Date
  declare expiresAt: Date

  static initModel(sequelize: Sequelize): void {
    ReviewClaim.init(
      {
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        claimedAt: { type: DataTypes.DATE(3), allowNull: false },
        expiresAt: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, tableName: 'review_claims', timestamps: false },
    )
  }
}

/** One person's classification of one spectrum; a correction is a later row that points at the call. */
export class ReviewCall extends Model<InferAttributes<ReviewCall>, InferCreationAttributes<ReviewCall>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare userId: number
  declare kind: CallKind
  declare firstCall: number | null
  declare correctsCallId: number | null
  /** MK notation as written back by shared/mk.ts, e.g. "A1 V n". */
  declare spectralType: string
  declare letter: string
  declare subtype: number
  declare typeCode: number
  declare luminosityClass: string
  declare classCode: number
  /** JSON string[] */
  declare peculiarities: string
  declare notes: string
  declare confidence: number
  declare uncertain: boolean
  declare acceptedSuggestion: boolean
  declare suggestionId: number | null
  declare suggestionShown: boolean
  declare secondsSpent: number | null
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: false })
    ReviewCall.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        kind: { type: DataTypes.STRING(12), allowNull: false },
        firstCall: { type: DataTypes.TINYINT.UNSIGNED, allowNull: true },
        correctsCallId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        spectralType: { type: DataTypes.STRING(60), allowNull: false },
        letter: { type: DataTypes.STRING(2), allowNull: false },
        subtype: num(),
        typeCode: num(),
        luminosityClass: { type: DataTypes.STRING(12), allowNull: false },
        classCode: num(),
        peculiarities: { type: DataTypes.TEXT, allowNull: false },
        notes: { type: DataTypes.TEXT, allowNull: false },
        confidence: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
        uncertain: { type: DataTypes.BOOLEAN, allowNull: false },
        acceptedSuggestion: { type: DataTypes.BOOLEAN, allowNull: false },
        suggestionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        suggestionShown: { type: DataTypes.BOOLEAN, allowNull: false },
        secondsSpent: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'review_calls', updatedAt: false, hooks: writeOnce('Calls') },
    )
  }
}

/** Opened when the required calls differ by more than the campaign's tolerance; a lead settles it. */
export class Dispute extends Model<InferAttributes<Dispute>, InferCreationAttributes<Dispute>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare campaignId: number
  /** JSON number[] */
  declare callIds: string
  declare typeSpread: number
  declare classSpread: number
  declare typeTolerance: number
  declare classTolerance: number
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    Dispute.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        callIds: { type: DataTypes.TEXT, allowNull: false },
        typeSpread: { type: DataTypes.DOUBLE, allowNull: false },
        classSpread: { type: DataTypes.DOUBLE, allowNull: false },
        typeTolerance: { type: DataTypes.DOUBLE, allowNull: false },
        classTolerance: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'disputes', updatedAt: false, hooks: writeOnce('Disputes') },
    )
  }
}

/** A lead's answer to a dispute other than settling it: another classifier's call, or the calls reopened. */
export class DisputeAction extends Model<InferAttributes<DisputeAction>, InferCreationAttributes<DisputeAction>> {
  declare id: CreationOptional<number>
  declare disputeId: number
  declare action: 'another-call' | 'reopened'
  declare note: string
  declare decidedBy: number
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    DisputeAction.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        disputeId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true },
        action: { type: DataTypes.STRING(20), allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: false },
        decidedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'dispute_actions', updatedAt: false, hooks: writeOnce('Dispute actions') },
    )
  }
}

/** The decided classification of a spectrum; the latest row per spectrum wins. */
export class Classification extends Model<InferAttributes<Classification>, InferCreationAttributes<Classification>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare source: ClassificationSource
  declare spectralType: string
  declare letter: string
  declare subtype: number
  declare typeCode: number
  declare luminosityClass: string
  declare classCode: number
  /** JSON string[] */
  declare peculiarities: string
  declare decidedBy: number | null
  declare nCalls: number
  /** JSON number[] */
  declare callIds: string
  declare agreement: Agreement
  declare typeSpread: number | null
  declare classSpread: number | null
  declare suggestionId: number | null
  declare disputeId: number | null
  declare note: string
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: false })
    Classification.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        source: { type: DataTypes.STRING(20), allowNull: false },
        spectralType: { type: DataTypes.STRING(60), allowNull: false },
        letter: { type: DataTypes.STRING(2), allowNull: false },
        subtype: num(),
        typeCode: num(),
        luminosityClass: { type: DataTypes.STRING(12), allowNull: false },
        classCode: num(),
        peculiarities: { type: DataTypes.TEXT, allowNull: false },
        decidedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        nCalls: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
        callIds: { type: DataTypes.TEXT, allowNull: false },
        agreement: { type: DataTypes.STRING(12), allowNull: false },
        typeSpread: { type: DataTypes.DOUBLE, allowNull: true },
        classSpread: { type: DataTypes.DOUBLE, allowNull: true },
        suggestionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        disputeId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, unique: true },
        note: { type: DataTypes.TEXT, allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'classifications', updatedAt: false, hooks: writeOnce('Classifications') },
    )
  }
}
