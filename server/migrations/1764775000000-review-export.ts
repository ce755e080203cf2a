/**
 * The review's CSV export (issue #10 §5) reads runs in keyset pages by (started_at, id) within a
 * range of local days: this index, team_id leading, live runs only, lets each page start where
 * the last one ended instead of sorting the team's runs again. (Notes page over
 * ix_observations_review_team, made for the counts.)
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class ReviewExport1764775000000 implements MigrationInterface {
  name = 'ReviewExport1764775000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE INDEX ix_runs_review_started ON runs (team_id, started_at, id) WHERE deleted_at IS NULL`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX ix_runs_review_started`);
  }
}
