/**
 * The evening review (issue #10 §1): the team's time zone and the indexes its counts read.
 *
 * - teams.time_zone: the IANA name the review's ISO weeks and days are counted in (default UTC;
 *   sign-up sets the browser's, the head coach changes it). The app checks the name with Intl
 *   (shared/weeks.ts timeZoneSchema); the CHECK only makes sure PostgreSQL can use it, through
 *   is_known_time_zone(): a name `AT TIME ZONE` refuses is not one. (A CHECK cannot read
 *   pg_timezone_names; the function is STABLE, and the zone files do not change under a row.)
 * - Two covering indexes over live notes, team_id leading, so the counts are index-only reads:
 *   one skater's notes in a time range (the skater matrix and a cell's notes), and the whole
 *   team's in a time range (a group's matrix and the one-week view). Tombstones are left out.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class Review1764760000000 implements MigrationInterface {
  name = 'Review1764760000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE FUNCTION is_known_time_zone(name text) RETURNS boolean LANGUAGE plpgsql STABLE AS $$
      BEGIN
        PERFORM now() AT TIME ZONE name;
        RETURN true;
      EXCEPTION WHEN invalid_parameter_value THEN
        RETURN false;
      END $$`);
    await q.query(`
      ALTER TABLE teams
        ADD COLUMN time_zone text NOT NULL DEFAULT 'UTC',
        ADD CONSTRAINT ck_teams_time_zone CHECK (char_length(time_zone) BETWEEN 1 AND 64 AND is_known_time_zone(time_zone))`);
    await q.query(`
      CREATE INDEX ix_observations_review_skater ON observations (team_id, skater_id, created_at)
        INCLUDE (cue_id, mark) WHERE deleted_at IS NULL`);
    await q.query(`
      CREATE INDEX ix_observations_review_team ON observations (team_id, created_at)
        INCLUDE (skater_id, cue_id, mark) WHERE deleted_at IS NULL`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX ix_observations_review_team`);
    await q.query(`DROP INDEX ix_observations_review_skater`);
    await q.query(`ALTER TABLE teams DROP CONSTRAINT ck_teams_time_zone, DROP COLUMN time_zone`);
    await q.query(`DROP FUNCTION is_known_time_zone(text)`);
  }
}
