import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A set of standards that suggestions are made against; exactly one version is active. */
export class LibraryVersion extends Model<InferAttributes<LibraryVersion>, InferCreationAttributes<LibraryVersion>> {
  declare id: CreationOptional<number>
  declare name: string
  declare description: string
  declare status: CreationOptional<'draft' | 'published'>
  declare isActive: CreationOptional<boolean>
  declare publishedAt: Date | null
  declare publishedBy: number | null
  /** The instrument whose standards this version promoted or demoted; null for other versions. */
  declare instrumentId: CreationOptional<number | null>
  /** The version this one was made from by a promotion or demotion. */
  declare basedOnId: CreationOptional<number | null>
  /** JSON VersionChanges (shared/api/standards.ts): what a promotion or demotion changed and why. */
  declare changes: CreationOptional<string | null>
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    LibraryVersion.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(60), allowNull: false, unique: true },
        description: { type: DataTypes.TEXT, allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
        isActive: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        publishedAt: { type: DataTypes.DATE(3), allowNull: true },
        publishedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        instrumentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
        basedOnId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
        changes: { type: DataTypes.TEXT('medium'), allowNull: true, defaultValue: null },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'library_versions', updatedAt: false },
    )
  }
}

/** A model standard from templates/ or an observed spectrum with an authoritative classification. */
export class Standard extends Model<InferAttributes<Standard>, InferCreationAttributes<Standard>> {
  declare id: CreationOptional<number>
  declare source: 'model' | 'observed'
  declare modelId: string | null
  /** Id in the shipped observed library (templates/observed-v2), e.g. "miles-0892". */
  declare templateId: CreationOptional<string | null>
  declare spectrumId: number | null
  /** Star name and the library it comes from, for shipped observed standards. */
  declare star: CreationOptional<string | null>
  declare origin: CreationOptional<string | null>
  declare spectralType: string
  declare typeCode: number
  declare luminosityClass: string
  declare classCode: number
  declare teff: number | null
  declare logg: number | null
  declare feh: CreationOptional<number | null>
  /** Resolution of the standard's spectrum, FWHM Å, when known. */
  declare resolutionFwhm: CreationOptional<number | null>
  declare note: string
  /** Observed standards: rectified flux on the grid, float32 LE, frozen when added. */
  declare rectified: Buffer | null
  declare addedBy: number | null
  declare retiredAt: Date | null
  /** The instrument this standard was promoted for (one of its agreed spectra); null for standards every spectrum is matched against. */
  declare instrumentId: CreationOptional<number | null>
  /** JSON StandardProvenance (shared/api/standards.ts) of a promoted standard: who decided, the calls, the date. */
  declare provenance: CreationOptional<string | null>
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    Standard.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        source: { type: DataTypes.STRING(16), allowNull: false },
        modelId: { type: DataTypes.STRING(32), allowNull: true, unique: true },
        templateId: { type: DataTypes.STRING(48), allowNull: true, unique: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        star: { type: DataTypes.STRING(60), allowNull: true },
        origin: { type: DataTypes.STRING(120), allowNull: true },
        spectralType: { type: DataTypes.STRING(40), allowNull: false },
        typeCode: { type: DataTypes.DOUBLE, allowNull: false },
        luminosityClass: { type: DataTypes.STRING(12), allowNull: false },
        classCode: { type: DataTypes.DOUBLE, allowNull: false },
        teff: { type: DataTypes.DOUBLE, allowNull: true },
        logg: { type: DataTypes.DOUBLE, allowNull: true },
        feh: { type: DataTypes.DOUBLE, allowNull: true },
        resolutionFwhm: { type: DataTypes.DOUBLE, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: false },
        rectified: { type: DataTypes.BLOB('medium'), allowNull: true },
        addedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        retiredAt: { type: DataTypes.DATE(3), allowNull: true },
        instrumentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
        provenance: { type: DataTypes.TEXT('medium'), allowNull: true, defaultValue: null },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'standards', updatedAt: false },
    )
  }
}

export class LibraryVersionStandard extends Model<InferAttributes<LibraryVersionStandard>, InferCreationAttributes<LibraryVersionStandard>> {
  declare versionId: number
  declare standardId: number

  static initModel(sequelize: Sequelize): void {
    LibraryVersionStandard.init(
      {
        versionId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        standardId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
      },
      { sequelize, tableName: 'library_version_standards', timestamps: false },
    )
  }
}

/** The pipeline's classification of one spectrum against one library version; older ones stay. */
export class Suggestion extends Model<InferAttributes<Suggestion>, InferCreationAttributes<Suggestion>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare measurementId: number
  declare libraryVersionId: number
  declare pipelineVersion: string
  declare isCurrent: boolean
  /** MK notation, e.g. "B8 III". */
  declare spectralType: string
  declare letter: string
  declare subtype: number
  declare typeCode: number
  declare luminosityClass: string
  declare classCode: number
  declare uncertaintySubtypes: number
  declare uncertaintyClasses: number
  declare bestStandardId: number | null
  /** JSON: the three nearest standards with χ². */
  declare candidates: string
  /** JSON: each luminosity/type criterion and its vote. */
  declare votes: string
  /** JSON string[] */
  declare flags: string
  /** JSON: probability over the (type, class) grid. */
  declare probabilities: string
  /** JSON SuggestionDetails (shared/api/suggestions.ts); null for suggestions made before pipeline 2. */
  declare details: CreationOptional<string | null>
  /** The instrument whose own standards the spectrum was matched against; null when none took part. */
  declare instrumentId: CreationOptional<number | null>
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: false })
    Suggestion.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        measurementId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        libraryVersionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        pipelineVersion: { type: DataTypes.STRING(20), allowNull: false },
        isCurrent: { type: DataTypes.BOOLEAN, allowNull: false },
        spectralType: { type: DataTypes.STRING(40), allowNull: false },
        letter: { type: DataTypes.STRING(2), allowNull: false },
        subtype: num(),
        typeCode: num(),
        luminosityClass: { type: DataTypes.STRING(12), allowNull: false },
        classCode: num(),
        uncertaintySubtypes: num(),
        uncertaintyClasses: num(),
        bestStandardId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        candidates: { type: DataTypes.TEXT('medium'), allowNull: false },
        votes: { type: DataTypes.TEXT('medium'), allowNull: false },
        flags: { type: DataTypes.TEXT, allowNull: false },
        probabilities: { type: DataTypes.TEXT('medium'), allowNull: false },
        details: { type: DataTypes.TEXT('medium'), allowNull: true },
        instrumentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'suggestions', updatedAt: false },
    )
  }
}
