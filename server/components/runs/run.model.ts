import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { RunHeadline, RunMetric, RunStatus } from '../../../shared/schemas/runs';
import type { RevisionModel } from '../revisions/revision.model';
import type { UserModel } from '../users/user.model';

export const RUN_STATUS_VALUES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;

/** One run of a revision: its state while queued and running, then its results. */
export class RunModel extends Model<InferAttributes<RunModel>, InferCreationAttributes<RunModel>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare revisionId: number;
  declare status: CreationOptional<RunStatus>;
  declare progress: CreationOptional<number>;
  declare stage: CreationOptional<string>;
  /** How many times a worker has started this run. */
  declare attempts: CreationOptional<number>;
  declare error: CreationOptional<string | null>;
  declare startedById: number | null;
  declare queuedAt: Date;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare durationMs: CreationOptional<number | null>;
  declare convergence: CreationOptional<{ a: number[]; b: number[] } | null>;
  declare metrics: CreationOptional<Record<string, Record<string, RunMetric>> | null>;
  declare plots: CreationOptional<Record<string, unknown> | null>;
  declare headline: CreationOptional<RunHeadline | null>;
  /** When the run's files were deleted to free storage (the row, metrics and events stay). */
  declare filesDeletedAt: CreationOptional<Date | null>;
  declare filesDeletedById: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare revision?: NonAttribute<RevisionModel>;
  declare startedBy?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    RunModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        revisionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        status: { type: DataTypes.ENUM(...RUN_STATUS_VALUES), allowNull: false, defaultValue: 'queued' },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        error: { type: DataTypes.TEXT, allowNull: true },
        startedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        queuedAt: { type: DataTypes.DATE(3), allowNull: false },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        durationMs: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        convergence: { type: DataTypes.JSON, allowNull: true },
        metrics: { type: DataTypes.JSON, allowNull: true },
        plots: { type: DataTypes.JSON, allowNull: true },
        headline: { type: DataTypes.JSON, allowNull: true },
        filesDeletedAt: { type: DataTypes.DATE(3), allowNull: true },
        filesDeletedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Run', tableName: 'runs', underscored: true },
    );
  }
}

/** What happened to a run and when (queued, started, stage changes, finished, notes). */
export class RunEventModel extends Model<InferAttributes<RunEventModel>, InferCreationAttributes<RunEventModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare status: RunStatus;
  declare stage: string;
  declare message: string;
  declare at: Date;

  static initModel(sequelize: Sequelize) {
    RunEventModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        status: { type: DataTypes.ENUM(...RUN_STATUS_VALUES), allowNull: false },
        stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
        message: { type: DataTypes.TEXT, allowNull: false },
        at: { type: DataTypes.DATE(3), allowNull: false },
      },
      { sequelize, modelName: 'RunEvent', tableName: 'run_events', underscored: true, timestamps: false },
    );
  }
}

/** A file a run produced; its bytes are the ordered chunks of RunArtifactChunkModel. */
export class RunArtifactModel extends Model<InferAttributes<RunArtifactModel>, InferCreationAttributes<RunArtifactModel>> {
  declare id: CreationOptional<number>;
  declare runId: number;
  declare name: string;
  declare mime: string;
  declare size: number;
  declare label: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    RunArtifactModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        runId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        name: { type: DataTypes.STRING(100), allowNull: false },
        mime: { type: DataTypes.STRING(60), allowNull: false },
        // BIGINT comes back from the driver as a string unless told otherwise.
        size: {
          type: DataTypes.BIGINT.UNSIGNED,
          allowNull: false,
          get(this: RunArtifactModel) {
            return Number(this.getDataValue('size'));
          },
        },
        label: { type: DataTypes.STRING(200), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'RunArtifact', tableName: 'run_artifacts', underscored: true },
    );
  }
}

/** Up to ARTIFACT_CHUNK_BYTES of an artifact, `seq` counting from 0. */
export class RunArtifactChunkModel extends Model<InferAttributes<RunArtifactChunkModel>, InferCreationAttributes<RunArtifactChunkModel>> {
  declare id: CreationOptional<number>;
  declare artifactId: number;
  declare seq: number;
  declare bytes: Buffer;

  static initModel(sequelize: Sequelize) {
    RunArtifactChunkModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        artifactId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        seq: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        bytes: { type: DataTypes.BLOB('medium'), allowNull: false },
      },
      { sequelize, modelName: 'RunArtifactChunk', tableName: 'run_artifact_chunks', underscored: true, timestamps: false },
    );
  }
}
