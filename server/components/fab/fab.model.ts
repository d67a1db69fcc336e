import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { DesignRuleKind } from '../../../shared/schemas/fab';
import type { UserModel } from '../users/user.model';

/** A project's own design rules (lengths in nm); absent: the defaults apply. */
export class ProjectDesignRulesModel extends Model<InferAttributes<ProjectDesignRulesModel>, InferCreationAttributes<ProjectDesignRulesModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare minGapNm: number;
  declare minFeatureNm: number;
  declare maxAspectRatio: number;
  declare updatedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare updatedBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    ProjectDesignRulesModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true },
        minGapNm: { type: DataTypes.DOUBLE, allowNull: false },
        minFeatureNm: { type: DataTypes.DOUBLE, allowNull: false },
        maxAspectRatio: { type: DataTypes.DOUBLE, allowNull: false },
        updatedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ProjectDesignRules', tableName: 'project_design_rules', underscored: true },
    );
  }
}

/** An owner's recorded decision to export a run despite its design-rule violations. */
export class ExportOverrideModel extends Model<InferAttributes<ExportOverrideModel>, InferCreationAttributes<ExportOverrideModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare userId: number | null;
  declare reason: string;
  declare counts: Record<DesignRuleKind, number>;
  declare at: Date;
  declare user?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    ExportOverrideModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        reason: { type: DataTypes.STRING(500), allowNull: false },
        counts: { type: DataTypes.JSON, allowNull: false },
        at: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, modelName: 'ExportOverride', tableName: 'fab_export_overrides', underscored: true, timestamps: false },
    );
  }
}

/** One download of a run's fab package. */
export class FabExportModel extends Model<InferAttributes<FabExportModel>, InferCreationAttributes<FabExportModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare userId: number | null;
  declare options: { layer: number; datatype: number; dbUnitNm: number; regenerated: boolean };
  declare overrideId: number | null;
  declare at: Date;

  static initModel(sequelize: Sequelize) {
    FabExportModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        options: { type: DataTypes.JSON, allowNull: false },
        overrideId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        at: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, modelName: 'FabExport', tableName: 'fab_exports', underscored: true, timestamps: false },
    );
  }
}
