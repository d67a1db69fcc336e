import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * When and by whom a run's files were deleted (the run row, its metrics and events stay), and the indexes
 * the quotas count with: a person's queued and running runs and tolerance studies.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('runs', 'files_deleted_at', { type: DataTypes.DATE(3), allowNull: true });
  await qi.addColumn('runs', 'files_deleted_by_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
    references: { model: 'users', key: 'id' },
    onDelete: 'SET NULL',
    onUpdate: 'CASCADE',
  });
  await qi.addIndex('runs', ['started_by_id', 'status'], { name: 'runs_started_by_status' });
  await qi.addIndex('tolerance_studies', ['started_by_id', 'status'], { name: 'tolerance_studies_started_by_status' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeIndex('tolerance_studies', 'tolerance_studies_started_by_status');
  await qi.removeIndex('runs', 'runs_started_by_status');
  await qi.removeColumn('runs', 'files_deleted_by_id');
  await qi.removeColumn('runs', 'files_deleted_at');
}
