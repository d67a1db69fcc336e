import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { UploadKind } from '../../../shared/schemas/uploads';
import type { UserModel } from '../users/user.model';

/** A picture or phase map uploaded to a project; the bytes live in the database. */
export class UploadModel extends Model<InferAttributes<UploadModel>, InferCreationAttributes<UploadModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare kind: UploadKind;
  declare name: string;
  declare mime: string;
  declare width: number;
  declare height: number;
  declare size: number;
  declare sha256: string;
  declare bytes: Buffer;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    UploadModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        kind: { type: DataTypes.ENUM('image', 'phase-map'), allowNull: false },
        name: { type: DataTypes.STRING(200), allowNull: false },
        mime: { type: DataTypes.STRING(60), allowNull: false },
        width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        bytes: { type: DataTypes.BLOB('long'), allowNull: false },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Upload', tableName: 'uploads', underscored: true },
    );
  }
}
