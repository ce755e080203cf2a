/**
 * The review's CSV export reads notes in keyset pages by (created_at, id): with this index,
 * team_id leading, live notes only, a page is an index range that starts where the last one
 * ended and comes out in order (ix_observations_review_team has no id, so each page was a
 * bitmap scan of the rest of the range and a sort: 100,000 rows took seconds per page).
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class ReviewExportNotes1764776000000 implements MigrationInterface {
  name = 'ReviewExportNotes1764776000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE INDEX ix_observations_export ON observations (team_id, created_at, id) WHERE deleted_at IS NULL`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX ix_observations_export`);
  }
}
