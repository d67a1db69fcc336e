import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Personal access tokens (API access for scripts, per user, read or write scope) and read-only share links
 * of one run for outside reviewers. Both store only the SHA-256 hash of their random token.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('access_tokens', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    name: { type: DataTypes.STRING(80), allowNull: false },
    scope: { type: DataTypes.ENUM('read', 'write'), allowNull: false },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    prefix: { type: DataTypes.STRING(16), allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: true },
    last_used_at: { type: DataTypes.DATE(3), allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('access_tokens', ['user_id', 'id'], { name: 'access_tokens_user' });

  await qi.createTable('share_links', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    run_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'runs', key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' },
    created_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL', onUpdate: 'CASCADE' },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    prefix: { type: DataTypes.STRING(16), allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('share_links', ['run_id', 'id'], { name: 'share_links_run' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('share_links');
  await qi.dropTable('access_tokens');
}
