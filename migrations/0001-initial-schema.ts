import { DataTypes, literal, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

// The first cut of the data model: people, collections, their vocabularies (subjects), examples,
// items, stored features, subject models, suggestions, night-shift runs and jobs, audit events,
// exports and sessions. Frozen: later changes go into new numbered migrations.

const now3 = literal('CURRENT_TIMESTAMP(3)');
const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false };
const bigId = { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true, allowNull: false };
const timestamps = {
  created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  updated_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
};
const ref = (table: string, onDelete: 'CASCADE' | 'SET NULL' | 'RESTRICT', allowNull = false, big = false) => ({
  type: big ? DataTypes.BIGINT.UNSIGNED : DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
});
const version = { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 };

export async function up({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  await qi.createTable('users', {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    display_name: { type: DataTypes.STRING(200), allowNull: false },
    role: { type: DataTypes.ENUM('admin', 'archivist', 'editor', 'manager'), allowNull: false },
    password_hash: { type: DataTypes.STRING(255), allowNull: true },
    saml_name_id: { type: DataTypes.STRING(255), allowNull: true, unique: true },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    last_sign_in_at: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });

  await qi.createTable('collections', {
    id,
    slug: { type: DataTypes.STRING(80), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(200), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    medium: { type: DataTypes.STRING(60), allowNull: false },
    alt_text_language: { type: DataTypes.STRING(35), allowNull: false, defaultValue: 'en' },
    alt_text_max_length: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 125 },
    house_style: { type: DataTypes.TEXT, allowNull: false },
    schedule_cron: { type: DataTypes.STRING(100), allowNull: false, defaultValue: '0 2 * * *' },
    schedule_timezone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
    schedule_enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    drop_folder: { type: DataTypes.STRING(1000), allowNull: true },
    archived_at: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });

  await qi.createTable('subjects', {
    id,
    collection_id: ref('collections', 'CASCADE'),
    broader_id: ref('subjects', 'SET NULL', true),
    kind: { type: DataTypes.ENUM('subject', 'form'), allowNull: false, defaultValue: 'subject' },
    pref_label: { type: DataTypes.STRING(200), allowNull: false },
    alt_labels: { type: DataTypes.JSON, allowNull: false },
    notation: { type: DataTypes.STRING(60), allowNull: true },
    scope_note: { type: DataTypes.TEXT, allowNull: true },
    alt_text_phrase: { type: DataTypes.STRING(200), allowNull: true },
    concept_uri: { type: DataTypes.STRING(500), allowNull: true },
    status: { type: DataTypes.ENUM('draft', 'active', 'retired'), allowNull: false, defaultValue: 'draft' },
    feeds_alt_text: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    version,
    ...timestamps,
  });
  await qi.addIndex('subjects', ['collection_id', 'pref_label'], { unique: true, name: 'subjects_collection_label' });
  await qi.addIndex('subjects', ['collection_id', 'broader_id'], { name: 'subjects_tree' });
  await qi.addIndex('subjects', ['collection_id', 'status', 'kind'], { name: 'subjects_status' });

  await qi.createTable('items', {
    id,
    collection_id: ref('collections', 'CASCADE'),
    identifier: { type: DataTypes.STRING(120), allowNull: false },
    file_name: { type: DataTypes.STRING(255), allowNull: false },
    file_key: { type: DataTypes.CHAR(64), allowNull: true },
    mime_type: { type: DataTypes.STRING(60), allowNull: true },
    width: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    height: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    byte_size: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
    caption: { type: DataTypes.TEXT, allowNull: true },
    creator: { type: DataTypes.STRING(300), allowNull: true },
    date_text: { type: DataTypes.STRING(100), allowNull: true },
    rights: { type: DataTypes.STRING(500), allowNull: true },
    caption_flagged: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    caption_flag_note: { type: DataTypes.TEXT, allowNull: true },
    state: { type: DataTypes.ENUM('new', 'suggested', 'approved'), allowNull: false, defaultValue: 'new' },
    alt_text: { type: DataTypes.TEXT, allowNull: true },
    long_description: { type: DataTypes.TEXT, allowNull: true },
    decorative: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ocr_text: { type: DataTypes.TEXT, allowNull: true },
    approved_by: ref('users', 'SET NULL', true),
    approved_at: { type: DataTypes.DATE(3), allowNull: true },
    version,
    ...timestamps,
  });
  await qi.addIndex('items', ['collection_id', 'identifier'], { unique: true, name: 'items_collection_identifier' });
  await qi.addIndex('items', ['collection_id', 'state'], { name: 'items_collection_state' });
  await qi.addIndex('items', ['collection_id', 'file_name'], { name: 'items_collection_file_name' });
  await qi.addIndex('items', ['file_key'], { name: 'items_file_key' });
  await qi.addIndex('items', ['approved_at'], { name: 'items_approved_at' });

  await qi.createTable('examples', {
    id,
    subject_id: ref('subjects', 'CASCADE'),
    medium: { type: DataTypes.ENUM('sketch', 'illustration', 'photo'), allowNull: false },
    origin: { type: DataTypes.ENUM('drawn', 'uploaded', 'promoted'), allowNull: false },
    file_key: { type: DataTypes.CHAR(64), allowNull: false },
    item_id: ref('items', 'SET NULL', true),
    created_by: ref('users', 'SET NULL', true),
    ...timestamps,
  });
  await qi.addIndex('examples', ['subject_id'], { name: 'examples_subject' });

  await qi.createTable('embeddings', {
    id: bigId,
    owner_type: { type: DataTypes.ENUM('item', 'example'), allowNull: false },
    owner_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    embedder_id: { type: DataTypes.STRING(120), allowNull: false },
    dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    vector: { type: DataTypes.BLOB('medium'), allowNull: false },
    ...timestamps,
  });
  await qi.addIndex('embeddings', ['owner_type', 'owner_id', 'embedder_id'], { unique: true, name: 'embeddings_owner' });
  await qi.addIndex('embeddings', ['embedder_id', 'owner_type'], { name: 'embeddings_embedder' });

  await qi.createTable('subject_models', {
    id,
    subject_id: ref('subjects', 'CASCADE'),
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    method: {
      type: DataTypes.ENUM('prototype', 'regressed', 'photo_augmented', 'refined', 'carried', 'trained'),
      allowNull: false,
    },
    embedder_id: { type: DataTypes.STRING(120), allowNull: false },
    dimension: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    weights: { type: DataTypes.BLOB('medium'), allowNull: false },
    bias: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    calibration: { type: DataTypes.JSON, allowNull: true },
    metrics: { type: DataTypes.JSON, allowNull: true },
    made_from: { type: DataTypes.JSON, allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    created_by: ref('users', 'SET NULL', true),
    ...timestamps,
  });
  await qi.addIndex('subject_models', ['subject_id', 'version'], { unique: true, name: 'subject_models_version' });
  await qi.addIndex('subject_models', ['subject_id', 'active'], { name: 'subject_models_active' });

  await qi.createTable('runs', {
    id,
    collection_id: ref('collections', 'CASCADE'),
    trigger: { type: DataTypes.ENUM('schedule', 'manual'), allowNull: false },
    status: { type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled'), allowNull: false },
    requested_by: ref('users', 'SET NULL', true),
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    counts: { type: DataTypes.JSON, allowNull: false },
    report: { type: DataTypes.JSON, allowNull: true },
    error: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('runs', ['collection_id', 'created_at'], { name: 'runs_collection_time' });
  await qi.addIndex('runs', ['collection_id', 'status'], { name: 'runs_collection_status' });

  await qi.createTable('suggestions', {
    id: bigId,
    item_id: ref('items', 'CASCADE'),
    subject_id: ref('subjects', 'CASCADE'),
    subject_model_id: ref('subject_models', 'SET NULL', true),
    run_id: ref('runs', 'SET NULL', true),
    score: { type: DataTypes.DOUBLE, allowNull: true },
    probability: { type: DataTypes.DOUBLE, allowNull: true },
    state: { type: DataTypes.ENUM('proposed', 'accepted', 'rejected', 'added'), allowNull: false },
    decided_by: ref('users', 'SET NULL', true),
    decided_at: { type: DataTypes.DATE(3), allowNull: true },
    version,
    ...timestamps,
  });
  await qi.addIndex('suggestions', ['item_id', 'subject_id'], { unique: true, name: 'suggestions_item_subject' });
  await qi.addIndex('suggestions', ['subject_id', 'state', 'score'], { name: 'suggestions_subject_rank' });
  await qi.addIndex('suggestions', ['state', 'decided_at'], { name: 'suggestions_decisions' });
  await qi.addIndex('suggestions', ['decided_by', 'decided_at'], { name: 'suggestions_decider' });

  await qi.createTable('jobs', {
    id: bigId,
    kind: { type: DataTypes.STRING(60), allowNull: false },
    payload: { type: DataTypes.JSON, allowNull: false },
    run_id: ref('runs', 'CASCADE', true),
    idempotency_key: { type: DataTypes.STRING(190), allowNull: true, unique: true },
    status: { type: DataTypes.ENUM('pending', 'running', 'done', 'failed'), allowNull: false, defaultValue: 'pending' },
    attempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 0 },
    max_attempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 5 },
    run_after: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
    lease_until: { type: DataTypes.DATE(3), allowNull: true },
    locked_by: { type: DataTypes.STRING(120), allowNull: true },
    progress: { type: DataTypes.JSON, allowNull: true },
    result: { type: DataTypes.JSON, allowNull: true },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('jobs', ['status', 'run_after'], { name: 'jobs_claim' });
  await qi.addIndex('jobs', ['status', 'lease_until'], { name: 'jobs_lease' });
  await qi.addIndex('jobs', ['run_id'], { name: 'jobs_run' });

  await qi.createTable('worker_heartbeats', {
    worker_id: { type: DataTypes.STRING(120), primaryKey: true, allowNull: false },
    hostname: { type: DataTypes.STRING(255), allowNull: false },
    pid: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    started_at: { type: DataTypes.DATE(3), allowNull: false },
    heartbeat_at: { type: DataTypes.DATE(3), allowNull: false },
    stopped_at: { type: DataTypes.DATE(3), allowNull: true },
    current_job_id: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
  });
  await qi.addIndex('worker_heartbeats', ['heartbeat_at'], { name: 'worker_heartbeats_time' });

  await qi.createTable('audit_events', {
    id: bigId,
    actor_id: ref('users', 'SET NULL', true),
    action: { type: DataTypes.STRING(60), allowNull: false },
    target_type: { type: DataTypes.STRING(40), allowNull: true },
    target_id: { type: DataTypes.STRING(64), allowNull: true },
    detail: { type: DataTypes.JSON, allowNull: true },
    ip: { type: DataTypes.STRING(45), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: now3 },
  });
  await qi.addIndex('audit_events', ['action', 'created_at'], { name: 'audit_events_action' });
  await qi.addIndex('audit_events', ['actor_id', 'created_at'], { name: 'audit_events_actor' });

  await qi.createTable('exports', {
    id,
    collection_id: ref('collections', 'CASCADE', true),
    kind: { type: DataTypes.ENUM('ledger_xlsx', 'items_csv', 'xmp_zip', 'iiif_manifest'), allowNull: false },
    period_from: { type: DataTypes.DATEONLY, allowNull: true },
    period_to: { type: DataTypes.DATEONLY, allowNull: true },
    status: { type: DataTypes.ENUM('queued', 'running', 'ready', 'failed'), allowNull: false, defaultValue: 'queued' },
    file_key: { type: DataTypes.CHAR(64), allowNull: true },
    row_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    requested_by: ref('users', 'SET NULL', true),
    error: { type: DataTypes.TEXT, allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('exports', ['collection_id', 'created_at'], { name: 'exports_collection' });

  // the shape connect-session-sequelize expects (sid, expires, data, timestamps named by our define options)
  await qi.createTable('sessions', {
    sid: { type: DataTypes.STRING(64), primaryKey: true, allowNull: false },
    expires: { type: DataTypes.DATE, allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex('sessions', ['expires'], { name: 'sessions_expires' });
}

export async function down({ context: qi }: MigrationParams<QueryInterface>): Promise<void> {
  for (const table of [
    'sessions',
    'exports',
    'audit_events',
    'worker_heartbeats',
    'jobs',
    'suggestions',
    'runs',
    'subject_models',
    'embeddings',
    'examples',
    'items',
    'subjects',
    'collections',
    'users',
  ]) {
    await qi.dropTable(table);
  }
}
