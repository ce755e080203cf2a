/**
 * A group's week counts, kept (issue #10 §7): the group matrix over a year of a 40-skater group
 * still summed about 64,000 rows of observation_week_counts (skaters x cues x weeks); under a
 * shared machine's load that alone took most of the 100 ms. observation_group_week_counts holds
 * the same counts summed per group of the team's live skaters (not retired, not deleted), by
 * team, group (the nil UUID for skaters in no group), local Monday and cue: a group's year is
 * about 1,600 rows, the whole team's the sum over its groups.
 *
 * Kept from observation_week_counts, so exact whenever it is: statement triggers on it add the
 * rows a statement inserts, take away the rows it deletes and, for an update, take away the old
 * values and add the new ones, each under the group its skater is in now (a retired or deleted
 * skater counts nowhere). A skater moved to another group, retired, brought back or deleted has
 * their counts taken from the old group and added to the new one (a row trigger on skaters). A
 * row taken down to 0 / 0 goes; a count that would go below zero fails the write. TRUNCATE of
 * the skaters' counts empties the groups' counts; a team's counts go with the team.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

/** The group key of a skater: their group, or the nil UUID for none. */
const NO_GROUP = `'00000000-0000-0000-0000-000000000000'::uuid`;

/** Signed sums of a set of observation_week_counts rows per group of their (live) skaters. */
const groupCountsOf = (rows: string, sign: string) => `
  SELECT r.team_id, coalesce(s.group_id, ${NO_GROUP}) AS group_key, r.week_start, r.cue_id,
         ${sign} * sum(r.needs_work) AS needs_work, ${sign} * sum(r.good) AS good
    FROM ${rows} r JOIN skaters s ON s.team_id = r.team_id AND s.id = r.skater_id
   WHERE s.deleted_at IS NULL AND s.retired_at IS NULL
   GROUP BY 1, 2, 3, 4`;

/** Adds signed sums into the table: keys there are updated, the others inserted (see 1764785000000). */
const apply = (counts: string) => `
  WITH delta AS (
    SELECT team_id, group_key, week_start, cue_id, sum(needs_work)::int AS needs_work, sum(good)::int AS good
      FROM (${counts}) c
     GROUP BY 1, 2, 3, 4
    HAVING sum(needs_work) <> 0 OR sum(good) <> 0
  ),
  updated AS (
    UPDATE observation_group_week_counts w
       SET needs_work = w.needs_work + d.needs_work, good = w.good + d.good
      FROM delta d
     WHERE w.team_id = d.team_id AND w.group_key = d.group_key AND w.week_start = d.week_start AND w.cue_id = d.cue_id
    RETURNING w.team_id, w.group_key, w.week_start, w.cue_id
  )
  INSERT INTO observation_group_week_counts AS w (team_id, group_key, week_start, cue_id, needs_work, good)
  SELECT d.* FROM delta d
   WHERE NOT EXISTS (SELECT 1 FROM updated u
                      WHERE u.team_id = d.team_id AND u.group_key = d.group_key AND u.week_start = d.week_start AND u.cue_id = d.cue_id)
   ORDER BY 1, 2, 3, 4
  ON CONFLICT (team_id, group_key, week_start, cue_id) DO UPDATE
    SET needs_work = w.needs_work + excluded.needs_work, good = w.good + excluded.good`;

const dropEmpty = (teams: string) => `
  DELETE FROM observation_group_week_counts
   WHERE needs_work = 0 AND good = 0 AND team_id IN (${teams})`;

export class ReviewGroupWeekCounts1764786000000 implements MigrationInterface {
  name = 'ReviewGroupWeekCounts1764786000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE observation_group_week_counts (
        team_id uuid NOT NULL,
        group_key uuid NOT NULL,
        week_start date NOT NULL,
        cue_id uuid NOT NULL,
        needs_work int NOT NULL,
        good int NOT NULL,
        CONSTRAINT pk_observation_group_week_counts PRIMARY KEY (team_id, group_key, week_start, cue_id),
        CONSTRAINT fk_observation_group_week_counts_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT ck_observation_group_week_counts_counts CHECK (needs_work >= 0 AND good >= 0)
      )`);
    // The whole team's weeks ('all'): every group's rows of a range of Mondays.
    await q.query(`
      CREATE INDEX ix_observation_group_week_counts_week ON observation_group_week_counts (team_id, week_start)
        INCLUDE (cue_id, needs_work, good)`);
    await q.query(`CREATE INDEX ix_observation_group_week_counts_empty ON observation_group_week_counts (team_id) WHERE needs_work = 0 AND good = 0`);

    await q.query(`
      CREATE FUNCTION observation_group_week_counts_insert() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(groupCountsOf('new_rows', '1'))};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_group_week_counts_update() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(`${groupCountsOf('old_rows', '-1')} UNION ALL ${groupCountsOf('new_rows', '1')}`)};
        ${dropEmpty('SELECT DISTINCT team_id FROM old_rows')};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_group_week_counts_delete() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(groupCountsOf('old_rows', '-1'))};
        ${dropEmpty('SELECT DISTINCT team_id FROM old_rows')};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE FUNCTION observation_group_week_counts_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        TRUNCATE observation_group_week_counts;
        RETURN NULL;
      END $$`);
    // A skater's counts leave the group they were counted in (if they counted) and join the one
    // they are in now (if they count now).
    await q.query(`
      CREATE FUNCTION observation_group_week_counts_skater() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        ${apply(`
          SELECT w.team_id, coalesce(OLD.group_id, ${NO_GROUP}) AS group_key, w.week_start, w.cue_id,
                 -w.needs_work AS needs_work, -w.good AS good
            FROM observation_week_counts w
           WHERE w.team_id = OLD.team_id AND w.skater_id = OLD.id AND OLD.deleted_at IS NULL AND OLD.retired_at IS NULL
          UNION ALL
          SELECT w.team_id, coalesce(NEW.group_id, ${NO_GROUP}), w.week_start, w.cue_id, w.needs_work, w.good
            FROM observation_week_counts w
           WHERE w.team_id = NEW.team_id AND w.skater_id = NEW.id AND NEW.deleted_at IS NULL AND NEW.retired_at IS NULL`)};
        ${dropEmpty('SELECT OLD.team_id')};
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE TRIGGER tg_week_counts_group_insert AFTER INSERT ON observation_week_counts
        REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_group_week_counts_insert()`);
    await q.query(`
      CREATE TRIGGER tg_week_counts_group_update AFTER UPDATE ON observation_week_counts
        REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_group_week_counts_update()`);
    await q.query(`
      CREATE TRIGGER tg_week_counts_group_delete AFTER DELETE ON observation_week_counts
        REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION observation_group_week_counts_delete()`);
    await q.query(`
      CREATE TRIGGER tg_week_counts_group_truncate AFTER TRUNCATE ON observation_week_counts
        FOR EACH STATEMENT EXECUTE FUNCTION observation_group_week_counts_truncate()`);
    await q.query(`
      CREATE TRIGGER tg_skaters_group_week_counts AFTER UPDATE OF group_id, retired_at, deleted_at ON skaters
        FOR EACH ROW
        WHEN (OLD.group_id IS DISTINCT FROM NEW.group_id OR (OLD.retired_at IS NULL) <> (NEW.retired_at IS NULL)
              OR (OLD.deleted_at IS NULL) <> (NEW.deleted_at IS NULL))
        EXECUTE FUNCTION observation_group_week_counts_skater()`);

    await q.query(`
      INSERT INTO observation_group_week_counts (team_id, group_key, week_start, cue_id, needs_work, good)
      SELECT team_id, group_key, week_start, cue_id, needs_work::int, good::int
        FROM (${groupCountsOf('observation_week_counts', '1')}) c
       WHERE needs_work <> 0 OR good <> 0`);
    await q.query(`ANALYZE observation_group_week_counts`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TRIGGER tg_skaters_group_week_counts ON skaters`);
    await q.query(`DROP TRIGGER tg_week_counts_group_truncate ON observation_week_counts`);
    await q.query(`DROP TRIGGER tg_week_counts_group_delete ON observation_week_counts`);
    await q.query(`DROP TRIGGER tg_week_counts_group_update ON observation_week_counts`);
    await q.query(`DROP TRIGGER tg_week_counts_group_insert ON observation_week_counts`);
    await q.query(`DROP FUNCTION observation_group_week_counts_skater()`);
    await q.query(`DROP FUNCTION observation_group_week_counts_truncate()`);
    await q.query(`DROP FUNCTION observation_group_week_counts_delete()`);
    await q.query(`DROP FUNCTION observation_group_week_counts_update()`);
    await q.query(`DROP FUNCTION observation_group_week_counts_insert()`);
    await q.query(`DROP TABLE observation_group_week_counts`);
  }
}
