import './mariadb-compat';
import { Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import type { AppConfig } from '../config';
import { AccessTokenModel } from '../components/access-tokens/access-token.model';
import { AuditEventModel } from '../components/audit/audit.model';
import { AtomLibraryShareModel } from '../components/atom-libraries/atom-library-share.model';
import { AtomLibraryModel } from '../components/atom-libraries/atom-library.model';
import { watchAccessWrites } from '../components/auth/access-cache';
import { watchListWrites } from './list-caches';
import { AuthTokenModel } from '../components/auth/auth-token.model';
import { SessionModel } from '../components/auth/session.model';
import { ExportOverrideModel, FabExportModel, ProjectDesignRulesModel } from '../components/fab/fab.model';
import { NotificationModel, NotificationPreferenceModel } from '../components/notifications/notification.model';
import { MembershipModel } from '../components/projects/membership.model';
import { ProjectModel } from '../components/projects/project.model';
import { ProjectActivityModel, ReviewCommentModel, ReviewThreadModel } from '../components/review/review.model';
import { RevisionModel } from '../components/revisions/revision.model';
import { ShareLinkModel } from '../components/share-links/share-link.model';
import { RunArtifactChunkModel, RunArtifactModel, RunEventModel, RunModel } from '../components/runs/run.model';
import { LibraryBuildModel } from '../components/library-builds/library-build.model';
import { ToleranceStudyModel } from '../components/tolerance/tolerance.model';
import { UploadModel } from '../components/uploads/upload.model';
import { UserModel } from '../components/users/user.model';
import { migrations } from './migrations/index';
import { bindSelect } from './select';
import { watchRunDetailWrites } from '../components/runs/run-detail-cache';

export type DbConfig = Pick<AppConfig, 'DB_HOST' | 'DB_PORT' | 'DB_NAME' | 'DB_USER' | 'DB_PASSWORD'> & Partial<Pick<AppConfig, 'DB_SOCKET'>>;

/** Opens the connection pool and binds every model to it. */
export function createSequelize(config: DbConfig, log?: (sql: string) => void): Sequelize {
  const sequelize = new Sequelize(config.DB_NAME, config.DB_USER, config.DB_PASSWORD, {
    host: config.DB_HOST,
    port: config.DB_PORT,
    dialect: 'mariadb',
    logging: log ?? false,
    dialectOptions: { connectTimeout: 5000, charset: 'utf8mb4', ...(config.DB_SOCKET ? { socketPath: config.DB_SOCKET } : {}) },
    define: { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci' },
    pool: { max: 10, min: 0, idle: 10_000 },
  });
  for (const model of [
    UserModel,
    AuthTokenModel,
    SessionModel,
    ProjectModel,
    MembershipModel,
    AtomLibraryModel,
    RevisionModel,
    UploadModel,
    RunModel,
    RunEventModel,
    RunArtifactModel,
    RunArtifactChunkModel,
    ToleranceStudyModel,
    ProjectDesignRulesModel,
    ExportOverrideModel,
    FabExportModel,
    ReviewThreadModel,
    ReviewCommentModel,
    ProjectActivityModel,
    NotificationModel,
    NotificationPreferenceModel,
    AccessTokenModel,
    ShareLinkModel,
    AuditEventModel,
    AtomLibraryShareModel,
    LibraryBuildModel,
  ]) {
    model.initModel(sequelize);
  }
  ProjectModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  ProjectModel.hasMany(MembershipModel, { as: 'memberships', foreignKey: 'projectId' });
  MembershipModel.belongsTo(UserModel, { as: 'user', foreignKey: 'userId' });
  MembershipModel.belongsTo(ProjectModel, { as: 'project', foreignKey: 'projectId' });
  RevisionModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  UploadModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  AtomLibraryModel.belongsTo(UserModel, { as: 'owner', foreignKey: 'ownerId' });
  RunModel.belongsTo(RevisionModel, { as: 'revision', foreignKey: 'revisionId' });
  RunModel.belongsTo(UserModel, { as: 'startedBy', foreignKey: 'startedById' });
  ProjectDesignRulesModel.belongsTo(UserModel, { as: 'updatedBy', foreignKey: 'updatedById' });
  ExportOverrideModel.belongsTo(UserModel, { as: 'user', foreignKey: 'userId' });
  ShareLinkModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  ReviewThreadModel.hasMany(ReviewCommentModel, { as: 'comments', foreignKey: 'threadId' });
  ReviewThreadModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  ReviewThreadModel.belongsTo(UserModel, { as: 'resolvedBy', foreignKey: 'resolvedById' });
  ReviewCommentModel.belongsTo(ReviewThreadModel, { as: 'thread', foreignKey: 'threadId' });
  ReviewCommentModel.belongsTo(UserModel, { as: 'author', foreignKey: 'authorId' });
  ProjectActivityModel.belongsTo(UserModel, { as: 'actor', foreignKey: 'actorId' });
  NotificationModel.belongsTo(UserModel, { as: 'actor', foreignKey: 'actorId' });
  NotificationModel.belongsTo(ProjectModel, { as: 'project', foreignKey: 'projectId' });
  LibraryBuildModel.belongsTo(UserModel, { as: 'createdBy', foreignKey: 'createdById' });
  watchAccessWrites();
  watchListWrites();
  watchRunDetailWrites();
  bindSelect(sequelize);
  return sequelize;
}

export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: migrations.map((m) => ({ name: m.name, up: m.up, down: m.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Applies every pending migration; returns the names applied. */
export async function migrateUp(sequelize: Sequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up();
  return applied.map((m) => m.name);
}
