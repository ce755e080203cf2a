/**
 * The device database's schema, versioned with `PRAGMA user_version`. Each entry upgrades from
 * the previous version; never edit a shipped entry, append a new one.
 *
 * One database file serves every user who signs in on the device (browsers allow only a few
 * per origin), so every row carries its team_id.
 */
import type { SqlDriver } from './driver';

export const deviceMigrations: readonly string[] = [
  // 1: squad, cue library, sessions, observations, outbox.
  `
  CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
  CREATE TABLE groups (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, name TEXT NOT NULL, sort_order INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_groups_team ON groups (team_id, sort_order);
  CREATE TABLE skaters (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, display_name TEXT NOT NULL, group_id TEXT,
    has_account INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_skaters_team ON skaters (team_id, display_name);
  CREATE TABLE cues (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, phase TEXT NOT NULL, label TEXT NOT NULL,
    sort_order INTEGER NOT NULL DEFAULT 0, archived INTEGER NOT NULL DEFAULT 0,
    hlc TEXT NOT NULL DEFAULT '{}', synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_cues_team ON cues (team_id, phase, sort_order);
  CREATE TABLE sessions (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, day TEXT NOT NULL, rink TEXT NOT NULL DEFAULT '',
    title TEXT NOT NULL DEFAULT '', focus_cue_ids TEXT NOT NULL DEFAULT '[]',
    created_at TEXT NOT NULL, created_by TEXT NOT NULL, hlc TEXT NOT NULL DEFAULT '{}',
    synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_sessions_team_day ON sessions (team_id, day);
  CREATE TABLE observations (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, session_id TEXT NOT NULL, skater_id TEXT NOT NULL,
    cue_id TEXT NOT NULL, mark TEXT NOT NULL CHECK (mark IN ('needs_work', 'good')),
    note TEXT NOT NULL DEFAULT '', note_shared INTEGER NOT NULL DEFAULT 0,
    created_at TEXT NOT NULL, created_by TEXT NOT NULL, deleted INTEGER NOT NULL DEFAULT 0,
    acknowledged_at TEXT,
    hlc TEXT NOT NULL DEFAULT '{}',
    -- 1 once the server has acknowledged the record: from then on a delete must be a tombstone.
    synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_observations_session ON observations (session_id, created_at);
  CREATE INDEX ix_observations_skater ON observations (team_id, skater_id, created_at);
  CREATE TABLE outbox (
    seq INTEGER PRIMARY KEY AUTOINCREMENT,
    op_id TEXT NOT NULL UNIQUE,
    team_id TEXT NOT NULL,
    user_id TEXT NOT NULL,
    tbl TEXT NOT NULL,
    record_id TEXT NOT NULL,
    kind TEXT NOT NULL CHECK (kind IN ('upsert', 'delete')),
    fields TEXT NOT NULL,
    hlc TEXT NOT NULL,
    attempts INTEGER NOT NULL DEFAULT 0,
    last_error TEXT,
    status TEXT NOT NULL DEFAULT 'pending' CHECK (status IN ('pending', 'rejected')),
    -- Set when a push carried this op: the server may have applied it even if no reply came.
    sent_at TEXT,
    created_at TEXT NOT NULL
  );
  CREATE INDEX ix_outbox_record ON outbox (tbl, record_id);
  CREATE INDEX ix_outbox_team_status ON outbox (team_id, status);
  `,
  // 2: sync bookkeeping. The server's reason for a rejected op; `synced` on the pull-only tables
  // (2 = "not yet confirmed by the running full re-sync", swept when it completes); the last known
  // server value of fields that local edits in the outbox are hiding, so a discarded edit can go
  // back to it.
  `
  ALTER TABLE outbox ADD COLUMN reject_reason TEXT;
  ALTER TABLE groups ADD COLUMN synced INTEGER NOT NULL DEFAULT 1;
  ALTER TABLE skaters ADD COLUMN synced INTEGER NOT NULL DEFAULT 1;
  CREATE TABLE sync_shadow (
    tbl TEXT NOT NULL, record_id TEXT NOT NULL, fields TEXT NOT NULL DEFAULT '{}',
    PRIMARY KEY (tbl, record_id)
  );
  `,
  // 3: who wrote each note (the author's name when it was made; the server's value comes down
  // with the next pull, notes made here carry the signed-in coach's name at once).
  `
  ALTER TABLE observations ADD COLUMN author_name TEXT NOT NULL DEFAULT '';
  `,
  // 4: retired skaters (off the board, their notes keep their name). Every skater the device holds
  // was live when it was pulled: the server stamps a retirement with a new server_seq, so it
  // comes down with the next pull.
  `
  ALTER TABLE skaters ADD COLUMN retired INTEGER NOT NULL DEFAULT 0;
  `,
  // 5: the clock (shared/sync-tables.ts runs, crossings, targets). Runs and crossings keep a
  // hidden row (`deleted`) until the server's tombstone arrives, like observations; targets are
  // never deleted (one id per skater, track and distance). No CHECKs: the store validates what a
  // coach enters, and a page the server sends (a newer server's value) must never fail to apply.
  // A crossing is written on every tap of a lane button during a race: one row, one index.
  `
  CREATE TABLE runs (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, heat_id TEXT NOT NULL, skater_id TEXT NOT NULL, day TEXT NOT NULL,
    distance_m INTEGER NOT NULL, track TEXT NOT NULL, lane TEXT NOT NULL, started_at TEXT NOT NULL,
    start_offset_ms INTEGER NOT NULL DEFAULT 0, target_ms INTEGER, status TEXT NOT NULL, stop_reason TEXT NOT NULL DEFAULT '',
    note TEXT NOT NULL DEFAULT '', created_by TEXT NOT NULL, author_name TEXT NOT NULL DEFAULT '', created_at TEXT NOT NULL,
    deleted INTEGER NOT NULL DEFAULT 0, hlc TEXT NOT NULL DEFAULT '{}', synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_runs_team_day ON runs (team_id, day, started_at);
  CREATE INDEX ix_runs_skater_day ON runs (team_id, skater_id, day);
  CREATE INDEX ix_runs_team_status ON runs (team_id, status);
  CREATE TABLE crossings (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, run_id TEXT NOT NULL, at_ms INTEGER NOT NULL,
    hand_timed INTEGER NOT NULL DEFAULT 0, created_at TEXT NOT NULL,
    deleted INTEGER NOT NULL DEFAULT 0, hlc TEXT NOT NULL DEFAULT '{}', synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_crossings_run ON crossings (run_id, at_ms);
  CREATE TABLE targets (
    id TEXT PRIMARY KEY, team_id TEXT NOT NULL, skater_id TEXT NOT NULL, distance_m INTEGER NOT NULL,
    track TEXT NOT NULL, target_ms INTEGER NOT NULL, plan TEXT NOT NULL DEFAULT 'even', opener_ms INTEGER, shares_pct TEXT,
    note TEXT NOT NULL DEFAULT '', updated_by TEXT NOT NULL DEFAULT '',
    hlc TEXT NOT NULL DEFAULT '{}', synced INTEGER NOT NULL DEFAULT 0
  );
  CREATE INDEX ix_targets_skater ON targets (team_id, skater_id, track, distance_m);
  `,
  // 6: tidy-up merges sessions: a merged session stays hidden (deleted = 1) while its delete
  // waits to be sent (shared/sync-tables.ts sessions `deletes: 'tombstone'`).
  `
  ALTER TABLE sessions ADD COLUMN deleted INTEGER NOT NULL DEFAULT 0;
  `,
];

export const DEVICE_SCHEMA_VERSION = deviceMigrations.length;

/** Brings the database to the latest version, each step in its own transaction. */
export async function migrateDevice(driver: SqlDriver): Promise<number> {
  const [{ user_version: current }] = await driver.all<{ user_version: number }>('PRAGMA user_version');
  if (current > deviceMigrations.length) {
    throw new Error(`The device database is newer (v${current}) than this app (v${deviceMigrations.length}): update Boardside`);
  }
  for (let version = current; version < deviceMigrations.length; version += 1) {
    await driver.exec('BEGIN');
    try {
      await driver.exec(deviceMigrations[version]);
      await driver.exec(`PRAGMA user_version = ${version + 1}`);
      await driver.exec('COMMIT');
    } catch (error) {
      await driver.exec('ROLLBACK');
      throw error;
    }
  }
  return deviceMigrations.length;
}
