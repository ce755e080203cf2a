/**
 * The pair clock's synced tables (issue #9; shared/sync-tables.ts describes them, shared/schemas/
 * clock.ts holds their rules):
 *
 * - runs: one skater's timed effort (a pair is two runs sharing heat_id), by the coach who timed it.
 * - crossings: the taps on a lane button (ms since the start signal), each belonging to its run.
 * - targets: a skater's target time for a distance on a track, with its pace plan; the id is
 *   derived from (team, skater, track, distance), so a unique index also holds it.
 *
 * Like every synced table: `team_id` leads every key and index, `server_seq` comes from the team
 * counter (stamp_server_seq catches any writer that does not stamp it), deletes are tombstones
 * (`deleted_at`, `deleted_hlc`), and the CHECK constraints mirror the zod rules so a value the
 * push lets through is never refused here, and one a broken writer sends is. Indexes: the pull's
 * keyset (team_id, server_seq); a skater's runs of a day (the skater's page, a skater's pull of
 * crossings through their runs, the review); a day's runs (the review); a run's crossings.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

const tables = [
  ['runs', 'runs'],
  ['crossings', 'crossings'],
  ['targets', 'targets'],
] as const;

export class Clock1764750000000 implements MigrationInterface {
  name = 'Clock1764750000000';

  public async up(q: QueryRunner): Promise<void> {
    // Section shares: a JSON array of 1..1000 numbers, each 0..100, summing to 100 ± 0.01
    // (shared/schemas/clock.ts sharesPctSchema). A function, because a CHECK cannot hold a subquery.
    await q.query(`
      CREATE FUNCTION clock_shares_ok(shares jsonb) RETURNS boolean LANGUAGE sql IMMUTABLE AS $$
        SELECT jsonb_typeof(shares) = 'array'
           AND jsonb_array_length(shares) BETWEEN 1 AND 1000
           AND NOT jsonb_path_exists(shares, '$[*] ? (@.type() != "number" || @ < 0 || @ > 100)')
           AND abs((SELECT sum(v::numeric) FROM jsonb_array_elements_text(shares) AS v) - 100) <= 0.01
      $$`);
    await q.query(`
      CREATE TABLE runs (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        heat_id uuid NOT NULL,
        skater_id uuid NOT NULL,
        day text NOT NULL,
        distance_m integer NOT NULL,
        track text NOT NULL,
        lane text NOT NULL,
        started_at timestamptz NOT NULL,
        start_offset_ms integer NOT NULL DEFAULT 0,
        target_ms integer NULL,
        status text NOT NULL,
        stop_reason text NOT NULL DEFAULT '',
        note text NOT NULL DEFAULT '',
        created_by uuid NOT NULL,
        author_name text NOT NULL DEFAULT '',
        created_at timestamptz NOT NULL,
        field_hlc jsonb NOT NULL DEFAULT '{}',
        server_seq bigint NOT NULL,
        deleted_at timestamptz NULL,
        deleted_hlc text NULL,
        CONSTRAINT pk_runs PRIMARY KEY (team_id, id),
        CONSTRAINT fk_runs_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_runs_skater FOREIGN KEY (team_id, skater_id) REFERENCES skaters (team_id, id),
        CONSTRAINT ck_runs_day CHECK (day ~ '^\\d{4}-\\d{2}-\\d{2}$'),
        CONSTRAINT ck_runs_track CHECK (track IN ('long', 'short')),
        CONSTRAINT ck_runs_distance CHECK (distance_m BETWEEN 0 AND 100000 AND (track = 'short' OR distance_m % 100 = 0)),
        CONSTRAINT ck_runs_lane CHECK (lane IN ('inner', 'outer', 'group')),
        CONSTRAINT ck_runs_start_offset CHECK (start_offset_ms BETWEEN 0 AND 5000),
        CONSTRAINT ck_runs_target CHECK (target_ms IS NULL OR target_ms BETWEEN 1 AND 86400000),
        CONSTRAINT ck_runs_status CHECK (status IN ('running', 'finished', 'stopped')),
        CONSTRAINT ck_runs_stop_reason_length CHECK (char_length(stop_reason) <= 80),
        CONSTRAINT ck_runs_note_length CHECK (char_length(note) <= 280),
        CONSTRAINT ck_runs_author_name_length CHECK (char_length(author_name) <= 200)
      )`);
    await q.query(`CREATE INDEX ix_runs_team_seq ON runs (team_id, server_seq)`);
    await q.query(`CREATE INDEX ix_runs_team_skater_day ON runs (team_id, skater_id, day)`);
    await q.query(`CREATE INDEX ix_runs_team_day ON runs (team_id, day)`);

    await q.query(`
      CREATE TABLE crossings (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        run_id uuid NOT NULL,
        at_ms integer NOT NULL,
        hand_timed boolean NOT NULL DEFAULT false,
        created_at timestamptz NOT NULL,
        field_hlc jsonb NOT NULL DEFAULT '{}',
        server_seq bigint NOT NULL,
        deleted_at timestamptz NULL,
        deleted_hlc text NULL,
        CONSTRAINT pk_crossings PRIMARY KEY (team_id, id),
        CONSTRAINT fk_crossings_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_crossings_run FOREIGN KEY (team_id, run_id) REFERENCES runs (team_id, id),
        CONSTRAINT ck_crossings_at CHECK (at_ms BETWEEN 0 AND 86400000)
      )`);
    await q.query(`CREATE INDEX ix_crossings_team_seq ON crossings (team_id, server_seq)`);
    await q.query(`CREATE INDEX ix_crossings_team_run ON crossings (team_id, run_id, at_ms)`);

    await q.query(`
      CREATE TABLE targets (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        skater_id uuid NOT NULL,
        distance_m integer NOT NULL,
        track text NOT NULL,
        target_ms integer NOT NULL,
        plan text NOT NULL DEFAULT 'even',
        opener_ms integer NULL,
        shares_pct jsonb NULL,
        note text NOT NULL DEFAULT '',
        updated_by uuid NOT NULL,
        field_hlc jsonb NOT NULL DEFAULT '{}',
        server_seq bigint NOT NULL,
        deleted_at timestamptz NULL,
        deleted_hlc text NULL,
        CONSTRAINT pk_targets PRIMARY KEY (team_id, id),
        CONSTRAINT fk_targets_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_targets_skater FOREIGN KEY (team_id, skater_id) REFERENCES skaters (team_id, id),
        CONSTRAINT ck_targets_track CHECK (track IN ('long', 'short')),
        CONSTRAINT ck_targets_distance CHECK (distance_m BETWEEN 1 AND 100000 AND (track = 'short' OR distance_m % 100 = 0)),
        CONSTRAINT ck_targets_target CHECK (target_ms BETWEEN 1 AND 86400000),
        CONSTRAINT ck_targets_plan CHECK (plan IN ('even', 'shares')),
        CONSTRAINT ck_targets_opener CHECK (opener_ms IS NULL OR (opener_ms BETWEEN 1 AND 86400000 AND opener_ms <= target_ms)),
        CONSTRAINT ck_targets_shares CHECK (shares_pct IS NULL OR clock_shares_ok(shares_pct)),
        CONSTRAINT ck_targets_plan_fields CHECK (
          (plan = 'even' AND shares_pct IS NULL) OR (plan = 'shares' AND shares_pct IS NOT NULL AND opener_ms IS NULL)),
        CONSTRAINT ck_targets_note_length CHECK (char_length(note) <= 280),
        CONSTRAINT uq_targets_skater_distance UNIQUE (team_id, skater_id, track, distance_m)
      )`);
    await q.query(`CREATE INDEX ix_targets_team_seq ON targets (team_id, server_seq)`);

    for (const [table, short] of tables) {
      await q.query(`
        CREATE TRIGGER tg_${short}_server_seq BEFORE INSERT OR UPDATE ON ${table}
        FOR EACH ROW EXECUTE FUNCTION stamp_server_seq()`);
    }
  }

  public async down(q: QueryRunner): Promise<void> {
    for (const [table, short] of [...tables].reverse()) await q.query(`DROP TRIGGER tg_${short}_server_seq ON ${table}`);
    await q.query(`DROP TABLE targets`);
    await q.query(`DROP TABLE crossings`);
    await q.query(`DROP TABLE runs`);
    await q.query(`DROP FUNCTION clock_shares_ok(jsonb)`);
  }
}
