import { DataTypes, Model, type CreationOptional, type Transaction, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { UserModel } from '../users/user.model';
import type { MembershipModel } from './membership.model';

export class ProjectModel extends Model<InferAttributes<ProjectModel>, InferCreationAttributes<ProjectModel>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare description: CreationOptional<string>;
  declare archivedAt: CreationOptional<Date | null>;
  declare createdById: ForeignKey<UserModel['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;
  declare memberships?: NonAttribute<MembershipModel[]>;

  static initModel(sequelize: Sequelize) {
    ProjectModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false, validate: { len: [1, 120] } },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        archivedAt: { type: DataTypes.DATE, allowNull: true },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Project', tableName: 'projects', underscored: true },
    );
  }
}

type TouchListener = (projectId: number, transaction?: Transaction) => void;
const touchListeners = new Set<TouchListener>();

/** Called after every `touchProject` (whose raw update no model hook sees), e.g. to drop cached answers. */
export function onProjectTouched(listener: TouchListener): void {
  touchListeners.add(listener);
}

/**
 * Moves the project's "last change" to now: a new revision, a run started or a run finished is a change of
 * the project as much as a new name is. Example: after a revision is saved the overview shows its time.
 */
export async function touchProject(projectId: number, transaction?: Transaction): Promise<void> {
  // Sequelize's own update leaves a row alone when only its timestamp changes, so say it in SQL.
  await ProjectModel.sequelize!.query('UPDATE projects SET updated_at = ? WHERE id = ?', { replacements: [new Date(), projectId], transaction });
  for (const listener of touchListeners) listener(projectId, transaction);
}
