import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { UserModel } from '../users/user.model';

/** A read-only link to one run for someone without an account; only the SHA-256 hash of its token is stored. */
export class ShareLinkModel extends Model<InferAttributes<ShareLinkModel>, InferCreationAttributes<ShareLinkModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare runId: number;
  declare createdById: number | null;
  declare tokenHash: string;
  declare prefix: string;
  declare expiresAt: Date | null;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    ShareLinkModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        prefix: { type: DataTypes.STRING(16), allowNull: false },
        expiresAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ShareLink', tableName: 'share_links', underscored: true },
    );
  }
}
