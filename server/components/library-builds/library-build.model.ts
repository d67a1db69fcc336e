import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { LibrarySpec } from '../../../shared/optics/library-builder';
import {
  LIBRARY_BUILD_SCOPES,
  LIBRARY_BUILD_STATUSES,
  type LibraryBuildProgress,
  type LibraryBuildResult,
  type LibraryBuildScope,
  type LibraryBuildStatus,
} from '../../../shared/schemas/library-builds';
import type { UserModel } from '../users/user.model';

/** A meta-atom library computed by RCWA on the run workers: spec, progress, result, and the library it stored. */
export class LibraryBuildModel extends Model<InferAttributes<LibraryBuildModel>, InferCreationAttributes<LibraryBuildModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare scope: LibraryBuildScope;
  declare name: string;
  declare status: CreationOptional<LibraryBuildStatus>;
  /** The spec as `parseLibrarySpec` normalized it. */
  declare spec: LibrarySpec;
  declare subsetSize: number | null;
  declare progress: CreationOptional<LibraryBuildProgress | null>;
  declare error: CreationOptional<string | null>;
  declare estimateSeconds: number;
  declare warnings: string[];
  declare result: CreationOptional<LibraryBuildResult | null>;
  declare libraryId: CreationOptional<number | null>;
  /** How many times a worker has started this build. */
  declare attempts: CreationOptional<number>;
  declare createdById: number | null;
  declare queuedAt: Date;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    LibraryBuildModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        scope: { type: DataTypes.ENUM(...LIBRARY_BUILD_SCOPES), allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        status: { type: DataTypes.ENUM(...LIBRARY_BUILD_STATUSES), allowNull: false, defaultValue: 'queued' },
        spec: { type: DataTypes.JSON, allowNull: false },
        subsetSize: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        progress: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        estimateSeconds: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        warnings: { type: DataTypes.JSON, allowNull: false },
        result: { type: DataTypes.JSON, allowNull: true },
        libraryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        queuedAt: { type: DataTypes.DATE(3), allowNull: false },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'LibraryBuild', tableName: 'library_builds', underscored: true },
    );
  }
}
