/**
 * Who wrote a note, and what the boards share by default.
 *
 * - observations.author_name: the author's display name as it was when the note was made, so a
 *   note keeps saying who wrote it on every device, offline and after the author leaves the team.
 *   The server writes it from the signed-in account on create (never from the device). Existing
 *   notes take their author's current name; the update stamps them with fresh server_seq numbers
 *   (stamp_server_seq), so every device pulls the names.
 * - teams.share_board_notes: whether a note written at the boards is shared with its skater unless
 *   the coach switches it off (the head coach's choice; until now every note was for coaches only).
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class NoteAuthors1764730000000 implements MigrationInterface {
  name = 'NoteAuthors1764730000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE observations ADD COLUMN author_name text NOT NULL DEFAULT ''`);
    await q.query(`
      UPDATE observations o SET author_name = u.display_name
        FROM users u
       WHERE u.id = o.created_by AND o.author_name = ''`);
    await q.query(`ALTER TABLE teams ADD COLUMN share_board_notes boolean NOT NULL DEFAULT false`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE teams DROP COLUMN share_board_notes`);
    await q.query(`ALTER TABLE observations DROP COLUMN author_name`);
  }
}
