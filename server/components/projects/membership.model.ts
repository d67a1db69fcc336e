import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { ProjectRole } from '../../../shared/roles';
import type { UserModel } from '../users/user.model';
import type { ProjectModel } from './project.model';

export class MembershipModel extends Model<InferAttributes<MembershipModel>, InferCreationAttributes<MembershipModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare userId: number;
  declare role: ProjectRole;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare user?: NonAttribute<UserModel>;
  declare project?: NonAttribute<ProjectModel>;

  static initModel(sequelize: Sequelize) {
    MembershipModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        role: { type: DataTypes.ENUM('owner', 'designer', 'reviewer', 'viewer'), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Membership', tableName: 'project_members', underscored: true },
    );
  }
}
