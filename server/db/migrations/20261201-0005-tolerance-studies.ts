import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Tolerance studies of finished runs (pillar-size bias and wavelength detuning sweeps): the request, live
 * progress and the results, one row per study; a run keeps every study made of it.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('tolerance_studies', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    run_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'runs', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    status: { type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed'), allowNull: false, defaultValue: 'queued' },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    stage: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
    request: { type: DataTypes.JSON, allowNull: false },
    results: { type: DataTypes.JSON, allowNull: true },
    error: { type: DataTypes.TEXT, allowNull: true },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    started_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
    queued_at: { type: DataTypes.DATE(3), allowNull: false },
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('tolerance_studies', ['run_id', 'id'], { name: 'tolerance_studies_run' });
  await qi.addIndex('tolerance_studies', ['status'], { name: 'tolerance_studies_status' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('tolerance_studies');
}
