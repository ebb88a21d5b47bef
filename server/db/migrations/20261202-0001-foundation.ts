import { DataTypes, QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  const now = { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW };
  await qi.createTable('programs', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    code: { type: DataTypes.STRING(12), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    created_at: now,
    updated_at: now,
  });
  await qi.createTable('users', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    role: {
      type: DataTypes.ENUM('technician', 'engineer', 'coordinator', 'driver', 'lead', 'admin'),
      allowNull: false,
    },
    password_hash: { type: DataTypes.STRING(100), allowNull: true },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    token_version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    email_prefs: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    created_at: now,
    updated_at: now,
  });
  await qi.createTable('program_members', {
    program_id: {
      type: DataTypes.UUID,
      primaryKey: true,
      references: { model: 'programs', key: 'id' },
      onDelete: 'CASCADE',
    },
    user_id: {
      type: DataTypes.UUID,
      primaryKey: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    created_at: now,
  });
  await qi.addIndex('program_members', ['user_id']);
  await qi.createTable('auth_links', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    purpose: { type: DataTypes.ENUM('invite', 'reset'), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    created_at: now,
  });
  await qi.createTable('outbox_messages', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    to_address: { type: DataTypes.STRING(254), allowNull: false },
    subject: { type: DataTypes.STRING(300), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    status: { type: DataTypes.ENUM('pending', 'sent', 'failed'), allowNull: false, defaultValue: 'pending' },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: now,
    last_error: { type: DataTypes.TEXT, allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    created_at: now,
  });
  await qi.addIndex('outbox_messages', ['status', 'next_attempt_at']);
  await qi.createTable('history_entries', {
    id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
    program_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'programs', key: 'id' } },
    entity_type: { type: DataTypes.STRING(40), allowNull: false },
    entity_id: { type: DataTypes.STRING(64), allowNull: false },
    action: { type: DataTypes.STRING(40), allowNull: false },
    actor_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'users', key: 'id' } },
    at: now,
    before: { type: DataTypes.JSONB, allowNull: true },
    after: { type: DataTypes.JSONB, allowNull: true },
    note: { type: DataTypes.TEXT, allowNull: true },
  });
  await qi.addIndex('history_entries', ['entity_type', 'entity_id', 'at']);
  await qi.addIndex('history_entries', ['program_id', 'at']);
  // The history is append-only: the database itself refuses updates and deletes.
  await qi.sequelize.query(`
    CREATE FUNCTION history_entries_append_only() RETURNS trigger AS $$
    BEGIN
      RAISE EXCEPTION 'history_entries is append-only';
    END;
    $$ LANGUAGE plpgsql;
    CREATE TRIGGER history_entries_no_change BEFORE UPDATE OR DELETE ON history_entries
      FOR EACH ROW EXECUTE FUNCTION history_entries_append_only();
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS history_entries_no_change ON history_entries');
  await qi.sequelize.query('DROP FUNCTION IF EXISTS history_entries_append_only()');
  for (const t of ['history_entries', 'outbox_messages', 'auth_links', 'program_members', 'users', 'programs']) {
    await qi.dropTable(t);
  }
  for (const e of ['enum_users_role', 'enum_auth_links_purpose', 'enum_outbox_messages_status']) {
    await qi.sequelize.query(`DROP TYPE IF EXISTS "${e}"`);
  }
}
