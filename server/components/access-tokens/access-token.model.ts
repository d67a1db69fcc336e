import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { TokenScope } from '../../../shared/schemas/access';

/** A personal access token for the API; only the SHA-256 hash of the secret is stored. */
export class AccessTokenModel extends Model<InferAttributes<AccessTokenModel>, InferCreationAttributes<AccessTokenModel>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare name: string;
  declare scope: TokenScope;
  declare tokenHash: string;
  declare prefix: string;
  declare expiresAt: Date | null;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AccessTokenModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        name: { type: DataTypes.STRING(80), allowNull: false },
        scope: { type: DataTypes.ENUM('read', 'write'), allowNull: false },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        prefix: { type: DataTypes.STRING(16), allowNull: false },
        expiresAt: { type: DataTypes.DATE, allowNull: true },
        lastUsedAt: { type: DataTypes.DATE(3), allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AccessToken', tableName: 'access_tokens', underscored: true },
    );
  }
}
