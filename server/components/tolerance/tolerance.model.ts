import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ToleranceRequestBody, ToleranceResults, ToleranceStatus } from '../../../shared/schemas/tolerance';
import { TOLERANCE_STATUSES } from '../../../shared/schemas/tolerance';

/** A tolerance study of a finished run: request, progress while it runs, then its results. */
export class ToleranceStudyModel extends Model<InferAttributes<ToleranceStudyModel>, InferCreationAttributes<ToleranceStudyModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare status: CreationOptional<ToleranceStatus>;
  declare progress: CreationOptional<number>;
  declare stage: CreationOptional<string>;
  declare request: ToleranceRequestBody;
  declare results: CreationOptional<ToleranceResults | null>;
  declare error: CreationOptional<string | null>;
  /** How many times a worker has started this study. */
  declare attempts: CreationOptional<number>;
  declare startedById: number | null;
  declare queuedAt: Date;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ToleranceStudyModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        status: { type: DataTypes.ENUM(...TOLERANCE_STATUSES), allowNull: false, defaultValue: 'queued' },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
        request: { type: DataTypes.JSON, allowNull: false },
        results: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        startedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        queuedAt: { type: DataTypes.DATE(3), allowNull: false },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ToleranceStudy', tableName: 'tolerance_studies', underscored: true },
    );
  }
}
