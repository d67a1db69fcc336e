import { DataTypes, type QueryInterface } from 'sequelize';

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true };
const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const userRef = (onDelete: 'CASCADE' | 'SET NULL', allowNull: boolean) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: 'users', key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
});

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('users', {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(80), allowNull: false },
    password_hash: { type: DataTypes.STRING(100), allowNull: true },
    site_role: { type: DataTypes.ENUM('admin', 'member'), allowNull: false, defaultValue: 'member' },
    disabled_at: { type: DataTypes.DATE, allowNull: true },
    last_sign_in_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await qi.createTable('auth_tokens', {
    id,
    user_id: userRef('CASCADE', false),
    purpose: { type: DataTypes.ENUM('reset', 'invite'), allowNull: false },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await qi.createTable('sessions', {
    sid: { type: DataTypes.STRING(64), primaryKey: true },
    expires: { type: DataTypes.DATE, allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('sessions', ['expires']);
  await qi.createTable('projects', {
    id,
    name: { type: DataTypes.STRING(120), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    archived_at: { type: DataTypes.DATE, allowNull: true },
    created_by_id: userRef('SET NULL', true),
    ...timestamps,
  });
  await qi.createTable('project_members', {
    id,
    project_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'projects', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    user_id: userRef('CASCADE', false),
    role: { type: DataTypes.ENUM('owner', 'designer', 'reviewer', 'viewer'), allowNull: false },
    ...timestamps,
  });
  await qi.addIndex('project_members', ['project_id', 'user_id'], { unique: true, name: 'project_members_project_user' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('project_members');
  await qi.dropTable('projects');
  await qi.dropTable('sessions');
  await qi.dropTable('auth_tokens');
  await qi.dropTable('users');
}
