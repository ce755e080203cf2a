/**
 * Synced tables as described once in shared/sync-tables.ts:
 * - cues store `archived` as the boolean the protocol carries (the archive moment was never
 *   read), and keep a delete's clock value like the other pushable tables;
 * - sync_tombstones remembers deletes of records the server never knew (a delete that overtook
 *   its create), so a create arriving later stays deleted.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class SyncTables1764700000000 implements MigrationInterface {
  name = 'SyncTables1764700000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE cues ADD COLUMN archived boolean NOT NULL DEFAULT false, ADD COLUMN deleted_hlc text NULL`);
    await q.query(`UPDATE cues SET archived = archived_at IS NOT NULL, server_seq = server_seq WHERE archived_at IS NOT NULL`);
    await q.query(`ALTER TABLE cues DROP COLUMN archived_at`);
    await q.query(`
      CREATE TABLE sync_tombstones (
        team_id uuid NOT NULL,
        tbl text NOT NULL,
        id uuid NOT NULL,
        deleted_at timestamptz NOT NULL DEFAULT now(),
        deleted_hlc text NOT NULL,
        CONSTRAINT pk_sync_tombstones PRIMARY KEY (team_id, id, tbl),
        CONSTRAINT fk_sync_tombstones_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX ix_sync_tombstones_team_deleted ON sync_tombstones (team_id, deleted_at)`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE sync_tombstones`);
    await q.query(`ALTER TABLE cues ADD COLUMN archived_at timestamptz NULL`);
    await q.query(`UPDATE cues SET archived_at = now(), server_seq = server_seq WHERE archived`);
    await q.query(`ALTER TABLE cues DROP COLUMN deleted_hlc, DROP COLUMN archived`);
  }
}
