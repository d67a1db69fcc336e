import { DataTypes, QueryTypes, type QueryInterface } from 'sequelize';

/**
 * Atom libraries uploaded as CSV: metadata in columns, the atoms as JSON text (metres and radians, the
 * engine's MetaAtom). A 'personal' library belongs to its owner (project_id null); a 'project' library to
 * one project. Revisions record the stored library they use (atom_library_id), so a used library cannot
 * be deleted (RESTRICT) and members of that project may read it.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('atom_libraries', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    material: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
    source: { type: DataTypes.STRING(500), allowNull: true },
    wavelength_nm: { type: DataTypes.DOUBLE, allowNull: false },
    period_nm: { type: DataTypes.DOUBLE, allowNull: false },
    height_nm: { type: DataTypes.DOUBLE, allowNull: false },
    approximate: { type: DataTypes.BOOLEAN, allowNull: false },
    atom_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    atoms: { type: DataTypes.TEXT('long'), allowNull: false },
    scope: { type: DataTypes.ENUM('personal', 'project'), allowNull: false },
    owner_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    project_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'projects', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('atom_libraries', ['owner_id', 'scope'], { name: 'atom_libraries_owner_scope' });
  await qi.addIndex('atom_libraries', ['project_id'], { name: 'atom_libraries_project' });
  await qi.addColumn('revisions', 'atom_library_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
    references: { model: 'atom_libraries', key: 'id' },
    onDelete: 'RESTRICT',
    onUpdate: 'CASCADE',
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // MariaDB drops a column only after its foreign key, whose name the database chose.
  const keys = await qi.sequelize.query<{ name: string }>(
    "SELECT CONSTRAINT_NAME AS name FROM information_schema.KEY_COLUMN_USAGE WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'revisions' AND COLUMN_NAME = 'atom_library_id' AND REFERENCED_TABLE_NAME IS NOT NULL",
    { type: QueryTypes.SELECT },
  );
  for (const { name } of keys) await qi.removeConstraint('revisions', name);
  await qi.removeColumn('revisions', 'atom_library_id');
  await qi.dropTable('atom_libraries');
}
