import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Library builds: a meta-atom library computed by RCWA on the run workers. The spec as sent, live progress
 * (atom i of N, seconds per atom), the result for the plots (per-atom powers, convergence, proposed subset)
 * and the atom library it stored (project or personal) once it succeeded.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('library_builds', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    scope: { type: DataTypes.ENUM('project', 'personal'), allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    status: { type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled'), allowNull: false, defaultValue: 'queued' },
    spec: { type: DataTypes.JSON, allowNull: false },
    subset_size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    progress: { type: DataTypes.JSON, allowNull: true },
    error: { type: DataTypes.TEXT, allowNull: true },
    estimate_seconds: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    warnings: { type: DataTypes.JSON, allowNull: false },
    result: { type: DataTypes.JSON, allowNull: true },
    library_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'atom_libraries', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    created_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
    queued_at: { type: DataTypes.DATE(3), allowNull: false },
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('library_builds', ['project_id', 'id'], { name: 'library_builds_project' });
  await qi.addIndex('library_builds', ['status'], { name: 'library_builds_status' });
  await qi.addIndex('library_builds', ['created_by_id', 'status'], { name: 'library_builds_creator' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('library_builds');
}
