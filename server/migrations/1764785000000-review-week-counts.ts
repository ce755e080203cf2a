/**
 * The review's week counts, kept by the database (issue #10 §7: a group's cues x 52 weeks over
 * 500,000 notes within 100 ms). Counting the notes themselves reads every one of them and turns
 * each instant into a local ISO week: about a second for a big squad's year, whatever the index.
 * So the counts are also kept, per team, local Monday, skater and cue, in
 * observation_week_counts, and the review's matrices and one-week grid sum those rows instead
 * (server/services/review/queries.ts); a cell's notes are still read from observations.
 *
 * Exact by construction, whatever writes the notes (push, tidy-up, purge, a script): statement
 * triggers on observations add the live rows a statement inserts, take away the live rows it
 * deletes, and for an update take away the old rows and add the new ones (mark, skater, cue,
 * instant, deleted_at: any change), through transition tables, one grouped upsert per statement;
 * a row taken down to 0 / 0 goes. A count that would go below zero breaks the CHECK and fails
 * the write rather than keep a wrong count. The week of a note is
 * date_trunc('week', created_at AT TIME ZONE teams.time_zone): the Monday of the ISO week that
 * to_char(..., 'IYYY-"W"IW') names. When a team's zone changes, its counts are counted again
 * from its notes (a trigger on teams, after taking the team's counter lock, which every write to
 * a team's notes holds until it commits, so none is counted in the old zone behind its back).
 * TRUNCATE of observations empties the counts. A team's counts go with the team.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

/** The counts of a set of observation rows (a transition table) with a sign: +1 or -1. */
const countsOf = (rows: string, sign: string) => `
  SELECT r.team_id, date_trunc('week', r.created_at AT TIME ZONE t.time_zone)::date AS week_start, r.skater_id, r.cue_id,
         ${sign} * count(*) FILTER (WHERE r.mark = 'needs_work') AS needs_work,
         ${sign} * count(*) FILTER (WHERE r.mark = 'good') AS good
    FROM ${rows} r JOIN teams t ON t.id = r.team_id
   WHERE r.deleted_at IS NULL
   GROUP BY 1, 2, 3, 4`;

/**
 * Adds signed counts (a query with the key, needs_work and good) into the table: the keys there
 * are updated, the others inserted. (Not one INSERT ... ON CONFLICT for both: PostgreSQL checks
 * the proposed row's CHECK before it finds the conflict, so a -1 would fail on a row of 3.)
 */
const apply = (counts: string) => `
  WITH delta AS (
    SELECT team_id, week_start, skater_id, cue_id, sum(needs_work)::int AS needs_work, sum(good)::int AS good
      FROM (${counts}) c
     GROUP BY 1, 2, 3, 4
    HAVING sum(needs_work) <> 0 OR sum(good) <> 0
  ),
  updated AS (
    UPDATE observation_week_counts w
       SET needs_work = w.needs_work + d.needs_work, good = w.good + d.good
      FROM delta d
     WHERE w.team_id = d.team_id AND w.week_start = d.week_start AND w.skater_id = d.skater_id AND w.cue_id = d.cue_id
    RETURNING w.team_id, w.week_start, w.skater_id, w.cue_id
  )
  INSERT INTO observation_week_counts AS w (team_id, week_start, skater_id, cue_id, needs_work, good)
  SELECT d.* FROM delta d
   WHERE NOT EXISTS (SELECT 1 FROM updated u
                      WHERE u.team_id = d.team_id AND u.week_start = d.week_start AND u.skater_id = d.skater_id AND u.cue_id = d.cue_id)
   ORDER BY 1, 2, 3, 4
  ON CONFLICT (team_id, week_start, skater_id, cue_id) DO UPDATE
    SET needs_work = w.needs_work + excluded.needs_work, good = w.good + excluded.good`;

/** Drops the rows a statement took down to 0 / 0 (found through the partial index of such rows). */
const dropEmpty = (rows: string) => `
  DELETE FROM observation_week_counts
   WHERE needs_work = 0 AND good = 0 AND team_id IN (SELECT DISTINCT team_id FROM ${rows})`;

export class ReviewWeekCounts1764785000000 implements MigrationInterface {
  name = 'ReviewWeekCounts1764785000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE observation_week_counts (
        team_id uuid NOT NULL,
        week_start date NOT NULL,
        skater_id uuid NOT NULL,
        cue_id uuid NOT NULL,
        needs_work int NOT NULL,
        good int NOT NULL,
        CONSTRAINT pk_observation_week_counts PRIMARY KEY (team_id, week_start, skater_id, cue_id),
        CONSTRAINT fk_observation_week_counts_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT ck_observation_week_counts_counts CHECK (needs_work >= 0 AND good >= 0)
      )`);
    // One skater's weeks (the skater matrix); the key serves a group's weeks and one week's grid.
    await q.query(`
      CREATE INDEX ix_observation_week_counts_skater ON observation_week_counts (team_id, skater_id, week_start)
        INCLUDE (cue_id, needs_work, good)`);
    await q.query(`CREATE INDEX ix_observation_week_counts_empty ON observation_week_counts (team_id) WHERE needs_work = 0 AND good = 0`);

    await q.query(`
      CREATE FUNCTION observation_week_counts_insert() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(countsOf('new_rows', '1'))};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_week_counts_update() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(`${countsOf('old_rows', '-1')} UNION ALL ${countsOf('new_rows', '1')}`)};
        ${dropEmpty('old_rows')};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_week_counts_delete() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(countsOf('old_rows', '-1'))};
        ${dropEmpty('old_rows')};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_week_counts_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        TRUNCATE observation_week_counts;
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_week_counts_recount() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        PERFORM 1 FROM team_counters WHERE team_id = NEW.id FOR UPDATE;
        DELETE FROM observation_week_counts WHERE team_id = NEW.id;
        INSERT INTO observation_week_counts (team_id, week_start, skater_id, cue_id, needs_work, good)
        SELECT o.team_id, date_trunc('week', o.created_at AT TIME ZONE NEW.time_zone)::date, o.skater_id, o.cue_id,
               count(*) FILTER (WHERE o.mark = 'needs_work'), count(*) FILTER (WHERE o.mark = 'good')
          FROM observations o
         WHERE o.team_id = NEW.id AND o.deleted_at IS NULL
         GROUP BY 1, 2, 3, 4;
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE TRIGGER tg_observations_week_counts_insert AFTER INSERT ON observations
        REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_week_counts_insert()`);
    await q.query(`
      CREATE TRIGGER tg_observations_week_counts_update AFTER UPDATE ON observations
        REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_week_counts_update()`);
    await q.query(`
      CREATE TRIGGER tg_observations_week_counts_delete AFTER DELETE ON observations
        REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_week_counts_delete()`);
    await q.query(`
      CREATE TRIGGER tg_observations_week_counts_truncate AFTER TRUNCATE ON observations
        FOR EACH STATEMENT EXECUTE FUNCTION observation_week_counts_truncate()`);
    await q.query(`
      CREATE TRIGGER tg_teams_week_counts_recount AFTER UPDATE OF time_zone ON teams
        FOR EACH ROW WHEN (OLD.time_zone IS DISTINCT FROM NEW.time_zone) EXECUTE FUNCTION observation_week_counts_recount()`);

    // The notes already there.
    await q.query(`
      INSERT INTO observation_week_counts (team_id, week_start, skater_id, cue_id, needs_work, good)
      SELECT o.team_id, date_trunc('week', o.created_at AT TIME ZONE t.time_zone)::date, o.skater_id, o.cue_id,
             count(*) FILTER (WHERE o.mark = 'needs_work'), count(*) FILTER (WHERE o.mark = 'good')
        FROM observations o JOIN teams t ON t.id = o.team_id
       WHERE o.deleted_at IS NULL
       GROUP BY 1, 2, 3, 4`);
    // Statistics now, not when autovacuum gets to it: the review's plans depend on them.
    await q.query(`ANALYZE observation_week_counts`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TRIGGER tg_teams_week_counts_recount ON teams`);
    await q.query(`DROP TRIGGER tg_observations_week_counts_truncate ON observations`);
    await q.query(`DROP TRIGGER tg_observations_week_counts_delete ON observations`);
    await q.query(`DROP TRIGGER tg_observations_week_counts_update ON observations`);
    await q.query(`DROP TRIGGER tg_observations_week_counts_insert ON observations`);
    await q.query(`DROP FUNCTION observation_week_counts_recount()`);
    await q.query(`DROP FUNCTION observation_week_counts_truncate()`);
    await q.query(`DROP FUNCTION observation_week_counts_delete()`);
    await q.query(`DROP FUNCTION observation_week_counts_update()`);
    await q.query(`DROP FUNCTION observation_week_counts_insert()`);
    await q.query(`DROP TABLE observation_week_counts`);
  }
}
