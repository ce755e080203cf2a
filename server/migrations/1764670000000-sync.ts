/**
 * Sync (see ../shared/SYNC.md): the board's own tables (sessions, observations), the per-team
 * counter that stamps every synced write with a `server_seq` that commits in order, the op log
 * that makes a retried push idempotent, the client-id registry, and the per-team sync horizon
 * (the oldest pull cursor still valid once tombstones have been purged).
 *
 * Existing synced tables (cues, skaters, skater_groups) gain `field_hlc`, `server_seq` and
 * `deleted_at`; their rows are numbered from the team counter so a first pull sees them.
 * `team_id` leads every key and index of team-owned tables ("Server order").
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

/** Tables whose rows reach the device through pull, with their short names for constraints. */
const legacySynced = [
  ['cues', 'cues'],
  ['skaters', 'skaters'],
  ['skater_groups', 'skater_groups'],
] as const;

const synced = [...legacySynced, ['sessions', 'sessions'], ['observations', 'observations']] as const;

export class Sync1764670000000 implements MigrationInterface {
  name = 'Sync1764670000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE team_counters (
        team_id uuid NOT NULL,
        seq bigint NOT NULL DEFAULT 0,
        CONSTRAINT pk_team_counters PRIMARY KEY (team_id),
        CONSTRAINT fk_team_counters_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT ck_team_counters_seq CHECK (seq >= 0)
      )`);
    await q.query(`
      CREATE TABLE team_sync_horizons (
        team_id uuid NOT NULL,
        horizon_seq bigint NOT NULL DEFAULT 0,
        purged_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_team_sync_horizons PRIMARY KEY (team_id),
        CONSTRAINT fk_team_sync_horizons_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE
      )`);
    await q.query(`
      CREATE TABLE sessions (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        day text NOT NULL,
        rink text NOT NULL DEFAULT '',
        title text NOT NULL DEFAULT '',
        focus_cue_ids jsonb NOT NULL DEFAULT '[]',
        created_at timestamptz NOT NULL,
        created_by uuid NOT NULL,
        field_hlc jsonb NOT NULL DEFAULT '{}',
        server_seq bigint NOT NULL,
        deleted_at timestamptz NULL,
        deleted_hlc text NULL,
        CONSTRAINT pk_sessions PRIMARY KEY (team_id, id),
        CONSTRAINT fk_sessions_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT ck_sessions_day CHECK (day ~ '^\\d{4}-\\d{2}-\\d{2}$'),
        CONSTRAINT ck_sessions_rink_length CHECK (char_length(rink) <= 80),
        CONSTRAINT ck_sessions_title_length CHECK (char_length(title) <= 80)
      )`);
    await q.query(`CREATE INDEX ix_sessions_team_seq ON sessions (team_id, server_seq)`);
    await q.query(`
      CREATE TABLE observations (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        session_id uuid NOT NULL,
        skater_id uuid NOT NULL,
        cue_id uuid NOT NULL,
        mark text NOT NULL,
        note text NOT NULL DEFAULT '',
        note_shared boolean NOT NULL DEFAULT false,
        created_at timestamptz NOT NULL,
        created_by uuid NOT NULL,
        acknowledged_at timestamptz NULL,
        field_hlc jsonb NOT NULL DEFAULT '{}',
        server_seq bigint NOT NULL,
        deleted_at timestamptz NULL,
        deleted_hlc text NULL,
        CONSTRAINT pk_observations PRIMARY KEY (team_id, id),
        CONSTRAINT fk_observations_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_observations_skater FOREIGN KEY (team_id, skater_id) REFERENCES skaters (team_id, id),
        CONSTRAINT ck_observations_mark CHECK (mark IN ('needs_work', 'good')),
        CONSTRAINT ck_observations_note_length CHECK (char_length(note) <= 280)
      )`);
    await q.query(`CREATE INDEX ix_observations_team_seq ON observations (team_id, server_seq)`);
    await q.query(`CREATE INDEX ix_observations_team_skater_created ON observations (team_id, skater_id, created_at)`);

    for (const [table] of legacySynced) {
      await q.query(`
        ALTER TABLE ${table}
          ADD COLUMN field_hlc jsonb NOT NULL DEFAULT '{}',
          ADD COLUMN server_seq bigint NULL,
          ADD COLUMN deleted_at timestamptz NULL`);
    }
    // One counter row per team; existing rows are numbered 1..n per team across the three tables.
    await q.query(`
      WITH numbered AS (
        SELECT tbl, team_id, id, row_number() OVER (PARTITION BY team_id ORDER BY ord, created_at, id) AS seq
          FROM (SELECT 'skater_groups' AS tbl, 1 AS ord, team_id, id, created_at FROM skater_groups
                UNION ALL SELECT 'skaters', 2, team_id, id, created_at FROM skaters
                UNION ALL SELECT 'cues', 3, team_id, id, created_at FROM cues) rows
      ),
      g AS (UPDATE skater_groups t SET server_seq = n.seq FROM numbered n
             WHERE n.tbl = 'skater_groups' AND t.team_id = n.team_id AND t.id = n.id),
      s AS (UPDATE skaters t SET server_seq = n.seq FROM numbered n
             WHERE n.tbl = 'skaters' AND t.team_id = n.team_id AND t.id = n.id),
      c AS (UPDATE cues t SET server_seq = n.seq FROM numbered n
             WHERE n.tbl = 'cues' AND t.team_id = n.team_id AND t.id = n.id)
      INSERT INTO team_counters (team_id, seq)
      SELECT t.id, coalesce((SELECT max(seq) FROM numbered n WHERE n.team_id = t.id), 0) FROM teams t`);
    for (const [table, short] of legacySynced) {
      await q.query(`ALTER TABLE ${table} ALTER COLUMN server_seq SET NOT NULL`);
      await q.query(`CREATE INDEX ix_${short}_team_seq ON ${table} (team_id, server_seq)`);
    }
    // Safety net: a write to a synced table that does not stamp server_seq itself gets the next
    // number from the team counter (same row lock, same transaction), so no writer can make a
    // change that pulls never see. The sync code and the known writers stamp explicitly.
    await q.query(`
      CREATE FUNCTION stamp_server_seq() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        IF TG_OP = 'INSERT' AND NEW.server_seq IS NOT NULL THEN RETURN NEW; END IF;
        IF TG_OP = 'UPDATE' AND NEW.server_seq IS DISTINCT FROM OLD.server_seq THEN RETURN NEW; END IF;
        INSERT INTO team_counters (team_id, seq) VALUES (NEW.team_id, 1)
          ON CONFLICT (team_id) DO UPDATE SET seq = team_counters.seq + 1
          RETURNING seq INTO NEW.server_seq;
        RETURN NEW;
      END $$`);
    for (const [table, short] of synced) {
      await q.query(`
        CREATE TRIGGER tg_${short}_server_seq BEFORE INSERT OR UPDATE ON ${table}
        FOR EACH ROW EXECUTE FUNCTION stamp_server_seq()`);
    }

    await q.query(`
      CREATE TABLE op_log (
        team_id uuid NOT NULL,
        op_id uuid NOT NULL,
        client_id uuid NOT NULL,
        user_id uuid NOT NULL,
        result jsonb NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_op_log PRIMARY KEY (team_id, op_id),
        CONSTRAINT fk_op_log_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX ix_op_log_team_created ON op_log (team_id, created_at)`);
    await q.query(`
      CREATE TABLE sync_clients (
        client_id uuid NOT NULL,
        user_id uuid NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_sync_clients PRIMARY KEY (client_id),
        CONSTRAINT fk_sync_clients_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX ix_sync_clients_user ON sync_clients (user_id)`);
  }

  public async down(q: QueryRunner): Promise<void> {
    for (const [table, short] of synced) await q.query(`DROP TRIGGER tg_${short}_server_seq ON ${table}`);
    await q.query(`DROP FUNCTION stamp_server_seq()`);
    await q.query(`DROP TABLE sync_clients`);
    await q.query(`DROP TABLE op_log`);
    for (const [table, short] of [...legacySynced].reverse()) {
      await q.query(`DROP INDEX ix_${short}_team_seq`);
      await q.query(`ALTER TABLE ${table} DROP COLUMN deleted_at, DROP COLUMN server_seq, DROP COLUMN field_hlc`);
    }
    await q.query(`DROP TABLE observations`);
    await q.query(`DROP TABLE sessions`);
    await q.query(`DROP TABLE team_sync_horizons`);
    await q.query(`DROP TABLE team_counters`);
  }
}
