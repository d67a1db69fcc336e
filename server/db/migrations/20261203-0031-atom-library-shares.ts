import { DataTypes, type QueryInterface } from 'sequelize';

/** A personal atom library its owner shared with one project (until then only the owner sees it). */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('atom_library_shares', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    atom_library_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'atom_libraries', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    shared_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('atom_library_shares', ['atom_library_id', 'project_id'], { name: 'atom_library_shares_once', unique: true });
  await qi.addIndex('atom_library_shares', ['project_id'], { name: 'atom_library_shares_project' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('atom_library_shares');
}
