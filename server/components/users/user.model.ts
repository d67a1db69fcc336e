import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { SiteRole } from '../../../shared/roles';

export class UserModel extends Model<InferAttributes<UserModel>, InferCreationAttributes<UserModel>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare passwordHash: string | null;
  declare siteRole: CreationOptional<SiteRole>;
  declare disabledAt: CreationOptional<Date | null>;
  declare lastSignInAt: CreationOptional<Date | null>;
  /** The person whose invitation created this account; null for sign-up, the demo seed and the first admin. */
  declare invitedById: CreationOptional<number | null>;
  /** Last password change or reset: sessions signed in before then are over. */
  declare credentialsChangedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    UserModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false, unique: true, validate: { isEmail: true } },
        name: { type: DataTypes.STRING(80), allowNull: false, validate: { len: [1, 80] } },
        passwordHash: { type: DataTypes.STRING(100), allowNull: true },
        siteRole: { type: DataTypes.ENUM('admin', 'member'), allowNull: false, defaultValue: 'member' },
        disabledAt: { type: DataTypes.DATE, allowNull: true },
        lastSignInAt: { type: DataTypes.DATE, allowNull: true },
        invitedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        credentialsChangedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'User', tableName: 'users', underscored: true },
    );
  }
}
