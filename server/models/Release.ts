import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

const refuse = (message: string) => () => {
  throw new Error(message)
}

/** A frozen catalogue release. Only `supersededBy` may be set, once; nothing else changes and nothing is removed. */
export class Release extends Model<InferAttributes<Release>, InferCreationAttributes<Release>> {
  declare id: CreationOptional<number>
  declare campaignId: number
  declare version: number
  declare title: string
  declare description: string
  declare authors: CreationOptional<string>
  declare rowCount: number
  /** JSON ExportColumn[] */
  declare columns: string
  /** JSON TableParam[] */
  declare params: string
  /** JSON string[] */
  declare notes: string
  declare createdBy: number
  declare createdAt: CreationOptional<Date>
  declare supersededBy: CreationOptional<number | null>

  static initModel(sequelize: Sequelize): void {
    Release.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        title: { type: DataTypes.STRING(200), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false },
        authors: { type: DataTypes.STRING(500), allowNull: false, defaultValue: '' },
        rowCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        columns: { type: DataTypes.TEXT('medium'), allowNull: false },
        params: { type: DataTypes.TEXT, allowNull: false },
        notes: { type: DataTypes.TEXT, allowNull: false },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        createdAt: DataTypes.DATE(3),
        supersededBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
      },
      {
        sequelize,
        tableName: 'releases',
        updatedAt: false,
        hooks: {
          beforeUpdate(release) {
            const changed = release.changed() || []
            if (changed.some((k) => k !== 'supersededBy') || release.previous('supersededBy') != null) {
              throw new Error('A release is frozen: only a newer release may supersede it, once.')
            }
          },
          beforeBulkUpdate: refuse('Releases are updated one at a time, and only to be superseded.'),
          beforeDestroy: refuse('Releases are never removed.'),
          beforeBulkDestroy: refuse('Releases are never removed.'),
        },
      },
    )
  }
}

/** One frozen row of a release: every column value as it was when the release was made. */
export class ReleaseRow extends Model<InferAttributes<ReleaseRow>, InferCreationAttributes<ReleaseRow>> {
  declare id: CreationOptional<number>
  declare releaseId: number
  declare position: number
  declare spectrumId: number
  /** JSON ExportRow */
  declare cells: string

  static initModel(sequelize: Sequelize): void {
    const frozen = refuse('Release rows are frozen.')
    ReleaseRow.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        releaseId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        position: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        cells: { type: DataTypes.TEXT('medium'), allowNull: false },
      },
      {
        sequelize,
        tableName: 'release_rows',
        timestamps: false,
        hooks: { beforeUpdate: frozen, beforeBulkUpdate: frozen, beforeDestroy: frozen, beforeBulkDestroy: frozen },
      },
    )
  }
}
