import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { NotificationKind } from '../../../shared/schemas/review';
import type { ProjectModel } from '../projects/project.model';
import type { UserModel } from '../users/user.model';

/** Something a user should know about (a mention, a reply, a run of theirs that finished). */
export class NotificationModel extends Model<InferAttributes<NotificationModel>, InferCreationAttributes<NotificationModel>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare projectId: number;
  declare kind: NotificationKind;
  declare runId: number | null;
  declare threadId: number | null;
  declare actorId: number | null;
  declare text: string;
  declare readAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare actor?: NonAttribute<UserModel | null>;
  declare project?: NonAttribute<ProjectModel>;

  static initModel(sequelize: Sequelize) {
    NotificationModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        kind: { type: DataTypes.ENUM('mention', 'reply', 'run-finished'), allowNull: false },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        threadId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        actorId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        text: { type: DataTypes.STRING(500), allowNull: false },
        readAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, modelName: 'Notification', tableName: 'notifications', underscored: true, updatedAt: false },
    );
  }
}

/** Which kinds of notification also reach a user by e-mail (no row: all of them). */
export class NotificationPreferenceModel extends Model<InferAttributes<NotificationPreferenceModel>, InferCreationAttributes<NotificationPreferenceModel>> {
  declare userId: number;
  declare emailMention: boolean;
  declare emailReply: boolean;
  declare emailRunFinished: boolean;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    NotificationPreferenceModel.init(
      {
        userId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        emailMention: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        emailReply: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        emailRunFinished: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'NotificationPreference', tableName: 'notification_preferences', underscored: true, createdAt: false },
    );
  }
}
