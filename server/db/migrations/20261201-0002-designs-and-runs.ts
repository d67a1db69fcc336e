import { DataTypes, type QueryInterface } from 'sequelize';

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const ref = (table: string, onDelete: 'CASCADE' | 'SET NULL', allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
});

/**
 * Revisions (immutable designs), uploads (pictures and phase maps, bytes in the database), runs with their
 * event log and artifacts. Artifacts are stored as ≤ 8 MiB chunks: a 2048² layout can reach ~200 MB, more
 * than one packet (max_allowed_packet) may carry.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('revisions', {
    id,
    project_id: ref('projects', 'CASCADE'),
    number: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    message: { type: DataTypes.STRING(500), allowNull: false, defaultValue: '' },
    design_name: { type: DataTypes.STRING(120), allowNull: false },
    design: { type: DataTypes.TEXT('long'), allowNull: false },
    created_by_id: ref('users', 'SET NULL', true),
    ...timestamps,
  });
  await qi.addIndex('revisions', ['project_id', 'number'], { unique: true, name: 'revisions_project_number' });

  await qi.createTable('uploads', {
    id,
    project_id: ref('projects', 'CASCADE'),
    kind: { type: DataTypes.ENUM('image', 'phase-map'), allowNull: false },
    name: { type: DataTypes.STRING(200), allowNull: false },
    mime: { type: DataTypes.STRING(60), allowNull: false },
    width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    bytes: { type: DataTypes.BLOB('long'), allowNull: false },
    created_by_id: ref('users', 'SET NULL', true),
    ...timestamps,
  });
  await qi.addIndex('uploads', ['project_id', 'created_at'], { name: 'uploads_project_created' });

  await qi.createTable('runs', {
    id,
    project_id: ref('projects', 'CASCADE'),
    revision_id: ref('revisions', 'CASCADE'),
    status: { type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled'), allowNull: false, defaultValue: 'queued' },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    error: { type: DataTypes.TEXT, allowNull: true },
    started_by_id: ref('users', 'SET NULL', true),
    queued_at: { type: DataTypes.DATE(3), allowNull: false },
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    duration_ms: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    convergence: { type: DataTypes.JSON, allowNull: true },
    metrics: { type: DataTypes.JSON, allowNull: true },
    plots: { type: DataTypes.JSON, allowNull: true },
    headline: { type: DataTypes.JSON, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('runs', ['project_id', 'queued_at'], { name: 'runs_project_queued' });
  await qi.addIndex('runs', ['status'], { name: 'runs_status' });

  await qi.createTable('run_events', {
    id,
    run_id: ref('runs', 'CASCADE'),
    status: { type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled'), allowNull: false },
    stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
    message: { type: DataTypes.TEXT, allowNull: false },
    at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('run_events', ['run_id', 'at'], { name: 'run_events_run_at' });

  await qi.createTable('run_artifacts', {
    id,
    run_id: ref('runs', 'CASCADE'),
    name: { type: DataTypes.STRING(100), allowNull: false },
    mime: { type: DataTypes.STRING(60), allowNull: false },
    size: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false },
    label: { type: DataTypes.STRING(200), allowNull: false },
    ...timestamps,
  });
  await qi.addIndex('run_artifacts', ['run_id', 'name'], { unique: true, name: 'run_artifacts_run_name' });

  await qi.createTable('run_artifact_chunks', {
    id,
    artifact_id: ref('run_artifacts', 'CASCADE'),
    seq: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    bytes: { type: DataTypes.BLOB('medium'), allowNull: false },
  });
  await qi.addIndex('run_artifact_chunks', ['artifact_id', 'seq'], { unique: true, name: 'run_artifact_chunks_artifact_seq' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('run_artifact_chunks');
  await qi.dropTable('run_artifacts');
  await qi.dropTable('run_events');
  await qi.dropTable('runs');
  await qi.dropTable('uploads');
  await qi.dropTable('revisions');
}
