/**
 * Tidy-up (issue #10 §4): a note can move to another skater, session or cue (shared/sync-tables.ts,
 * observations). The skaters a note belonged to before are kept in observations.former_skater_ids
 * (a JSON list of ids, server only): a skater or guardian of one of them pulls the note as an
 * eviction, so a moved note leaves the old skater's device. No index: the viewer's pull reads
 * through (team_id, server_seq) and tests the list on those rows only.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class NoteMoves1764771000000 implements MigrationInterface {
  name = 'NoteMoves1764771000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      ALTER TABLE observations
        ADD COLUMN former_skater_ids jsonb NOT NULL DEFAULT '[]',
        ADD CONSTRAINT ck_observations_former_skaters CHECK (jsonb_typeof(former_skater_ids) = 'array')`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE observations DROP CONSTRAINT ck_observations_former_skaters, DROP COLUMN former_skater_ids`);
  }
}
