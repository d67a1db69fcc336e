import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Who created an account by inviting it, and who issued each invitation link (so revoking or resending
 * touches only one's own); when an account's credentials last changed (sessions signed in before then end).
 */
const personOrNull = () => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
});

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('users', 'invited_by_id', personOrNull());
  await qi.addColumn('users', 'credentials_changed_at', { type: DataTypes.DATE(3), allowNull: true });
  await qi.addColumn('auth_tokens', 'created_by_id', personOrNull());
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn('auth_tokens', 'created_by_id');
  await qi.removeColumn('users', 'credentials_changed_at');
  await qi.removeColumn('users', 'invited_by_id');
}
