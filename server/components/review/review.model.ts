import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { UserModel } from '../users/user.model';

/** A comment thread pinned to a point of one preview image of a run (x, y: fractions of its width, height). */
export class ReviewThreadModel extends Model<InferAttributes<ReviewThreadModel>, InferCreationAttributes<ReviewThreadModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare runId: number;
  declare revisionId: number;
  declare artifact: string;
  declare x: number;
  declare y: number;
  declare createdById: number | null;
  declare resolvedAt: CreationOptional<Date | null>;
  declare resolvedById: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare createdBy?: NonAttribute<UserModel | null>;
  declare resolvedBy?: NonAttribute<UserModel | null>;
  declare comments?: NonAttribute<ReviewCommentModel[]>;

  static initModel(sequelize: Sequelize) {
    ReviewThreadModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        revisionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        artifact: { type: DataTypes.STRING(100), allowNull: false },
        x: { type: DataTypes.DOUBLE, allowNull: false },
        y: { type: DataTypes.DOUBLE, allowNull: false },
        createdById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        resolvedAt: { type: DataTypes.DATE(3), allowNull: true },
        resolvedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, modelName: 'ReviewThread', tableName: 'review_threads', underscored: true },
    );
  }
}

/** One plain-text comment of a thread; `mentions`: ids of the project members it names with `@`. */
export class ReviewCommentModel extends Model<InferAttributes<ReviewCommentModel>, InferCreationAttributes<ReviewCommentModel>> {
  declare id: CreationOptional<number>;
  declare threadId: number;
  declare authorId: number | null;
  declare body: string;
  declare mentions: number[];
  declare editedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare author?: NonAttribute<UserModel | null>;
  declare thread?: NonAttribute<ReviewThreadModel>;

  static initModel(sequelize: Sequelize) {
    ReviewCommentModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        threadId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        authorId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        body: { type: DataTypes.TEXT, allowNull: false },
        mentions: {
          type: DataTypes.JSON,
          allowNull: false,
          // MariaDB stores JSON as text; the driver may hand it back unparsed.
          get(this: ReviewCommentModel) {
            const raw = this.getDataValue('mentions') as unknown;
            return (typeof raw === 'string' ? JSON.parse(raw) : raw) as number[];
          },
        },
        editedAt: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, modelName: 'ReviewComment', tableName: 'review_comments', underscored: true },
    );
  }
}

/** Project events no other table keeps: membership changes, threads resolved or reopened. */
export class ProjectActivityModel extends Model<InferAttributes<ProjectActivityModel>, InferCreationAttributes<ProjectActivityModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare actorId: number | null;
  declare kind: string;
  declare text: string;
  declare runId: number | null;
  declare threadId: number | null;
  declare at: Date;
  declare actor?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    ProjectActivityModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        actorId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        text: { type: DataTypes.STRING(300), allowNull: false },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        threadId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        at: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, modelName: 'ProjectActivity', tableName: 'project_activity', underscored: true, timestamps: false },
    );
  }
}
