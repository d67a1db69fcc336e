import { DataTypes, type QueryInterface } from 'sequelize';

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const ref = (table: string, onDelete: 'CASCADE' | 'SET NULL', allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
});

/**
 * Design rules per project (one row once an owner saved them; the defaults of shared/optics/drc.ts apply
 * before), owners' recorded overrides that allow a run with design-rule violations to be exported, and a
 * record of every fab-package download (who, when, options) for later review.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('project_design_rules', {
    id,
    project_id: { ...ref('projects', 'CASCADE'), unique: true },
    min_gap_nm: { type: DataTypes.DOUBLE, allowNull: false },
    min_feature_nm: { type: DataTypes.DOUBLE, allowNull: false },
    max_aspect_ratio: { type: DataTypes.DOUBLE, allowNull: false },
    updated_by_id: ref('users', 'SET NULL', true),
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });

  await qi.createTable('fab_export_overrides', {
    id,
    run_id: ref('runs', 'CASCADE'),
    user_id: ref('users', 'SET NULL', true),
    reason: { type: DataTypes.STRING(500), allowNull: false },
    /** The violation counts the owner saw when overriding, per kind. */
    counts: { type: DataTypes.JSON, allowNull: false },
    at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('fab_export_overrides', ['run_id', 'at'], { name: 'fab_export_overrides_run_at' });

  await qi.createTable('fab_exports', {
    id,
    run_id: ref('runs', 'CASCADE'),
    user_id: ref('users', 'SET NULL', true),
    /** layer, datatype, dbUnitNm as used, and whether the GDSII was regenerated. */
    options: { type: DataTypes.JSON, allowNull: false },
    override_id: ref('fab_export_overrides', 'SET NULL', true),
    at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('fab_exports', ['run_id', 'at'], { name: 'fab_exports_run_at' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('fab_exports');
  await qi.dropTable('fab_export_overrides');
  await qi.dropTable('project_design_rules');
}
