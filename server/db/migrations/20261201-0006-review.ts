import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Review: comment threads pinned to a point of a run's preview image (image fractions, so a pin keeps its
 * place at any zoom), their comments, in-app notifications with each user's e-mail choices, and project
 * activity that no other table records (membership changes, threads resolved and reopened).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const ref = (model: string, onDelete: 'CASCADE' | 'SET NULL') => ({ references: { model, key: 'id' }, onDelete, onUpdate: 'CASCADE' });
  await qi.createTable('review_threads', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('projects', 'CASCADE') },
    run_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('runs', 'CASCADE') },
    revision_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('revisions', 'CASCADE') },
    artifact: { type: DataTypes.STRING(100), allowNull: false },
    x: { type: DataTypes.DOUBLE, allowNull: false },
    y: { type: DataTypes.DOUBLE, allowNull: false },
    created_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('users', 'SET NULL') },
    resolved_at: { type: DataTypes.DATE(3), allowNull: true },
    resolved_by_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('users', 'SET NULL') },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    updated_at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('review_threads', ['run_id', 'id'], { name: 'review_threads_run' });
  await qi.addIndex('review_threads', ['project_id', 'created_at'], { name: 'review_threads_project' });

  await qi.createTable('review_comments', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    thread_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('review_threads', 'CASCADE') },
    author_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('users', 'SET NULL') },
    body: { type: DataTypes.TEXT, allowNull: false },
    mentions: { type: DataTypes.JSON, allowNull: false },
    edited_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    updated_at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('review_comments', ['thread_id', 'id'], { name: 'review_comments_thread' });

  await qi.createTable('notifications', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('users', 'CASCADE') },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('projects', 'CASCADE') },
    kind: { type: DataTypes.ENUM('mention', 'reply', 'run-finished'), allowNull: false },
    run_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('runs', 'CASCADE') },
    thread_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('review_threads', 'CASCADE') },
    actor_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('users', 'SET NULL') },
    text: { type: DataTypes.STRING(500), allowNull: false },
    read_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('notifications', ['user_id', 'id'], { name: 'notifications_user' });

  await qi.createTable('notification_preferences', {
    user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, ...ref('users', 'CASCADE') },
    email_mention: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    email_reply: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    email_run_finished: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });

  await qi.createTable('project_activity', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    project_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, ...ref('projects', 'CASCADE') },
    actor_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('users', 'SET NULL') },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    text: { type: DataTypes.STRING(300), allowNull: false },
    run_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('runs', 'CASCADE') },
    thread_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, ...ref('review_threads', 'CASCADE') },
    at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('project_activity', ['project_id', 'at'], { name: 'project_activity_project' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('project_activity');
  await qi.dropTable('notification_preferences');
  await qi.dropTable('notifications');
  await qi.dropTable('review_comments');
  await qi.dropTable('review_threads');
}
