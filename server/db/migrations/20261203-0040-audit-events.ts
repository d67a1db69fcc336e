import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * The security event log: who did what to whom, when, from which address. The account and project ids
 * carry no foreign keys on purpose, so an event keeps naming the account after it has been deleted.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('audit_events', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    at: { type: DataTypes.DATE(3), allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    actor_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    subject_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    address: { type: DataTypes.STRING(64), allowNull: true },
    detail: { type: DataTypes.JSON, allowNull: false },
  });
  await qi.addIndex('audit_events', ['kind', 'id'], { name: 'audit_events_kind' });
  await qi.addIndex('audit_events', ['actor_id', 'id'], { name: 'audit_events_actor' });
  await qi.addIndex('audit_events', ['subject_user_id', 'id'], { name: 'audit_events_subject' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('audit_events');
}
