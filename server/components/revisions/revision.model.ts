import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { UserModel } from '../users/user.model';

/** An immutable saved design; `design` is the validated design as JSON text. */
export class RevisionModel extends Model<InferAttributes<RevisionModel>, InferCreationAttributes<RevisionModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare number: number;
  declare message: string;
  declare designName: string;
  declare design: string;
  declare createdById: number | null;
  /** The stored atom library the design uses (null: the demo library). */
  declare atomLibraryId: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    RevisionModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        number: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        message: { type: DataTypes.STRING(500), allowNull: false, defaultValue: '' },
        designName: { type: DataTypes.STRING(120), allowNull: false },
        design: { type: DataTypes.TEXT('long'), allowNull: false },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        atomLibraryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Revision', tableName: 'revisions', underscored: true },
    );
  }
}
