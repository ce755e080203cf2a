/**
 * Token families: one row per sign-in (the family of refresh tokens that rotate from it). Access
 * tokens name their family (`sid`), and every authenticated request checks that it is not revoked
 * with one primary-key lookup, so signing out, a password reset or a replayed refresh token ends
 * the sign-in's access tokens at once. Revoking takes this row's lock, which also orders it
 * against a concurrent refresh of the same family.
 *
 * Existing families are copied from refresh_tokens: a family is revoked when all its tokens are.
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class TokenFamilies1764720000000 implements MigrationInterface {
  name = 'TokenFamilies1764720000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE token_families (
        id uuid NOT NULL,
        user_id uuid NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        revoked_at timestamptz NULL,
        CONSTRAINT pk_token_families PRIMARY KEY (id),
        CONSTRAINT fk_token_families_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE CASCADE
      )`);
    // Revoking every sign-in of a user (password reset) finds the live ones only.
    await q.query(`CREATE INDEX ix_token_families_user_live ON token_families (user_id) WHERE revoked_at IS NULL`);
    await q.query(`
      INSERT INTO token_families (id, user_id, created_at, revoked_at)
      SELECT family_id, user_id, min(created_at),
             CASE WHEN bool_and(revoked_at IS NOT NULL) THEN max(revoked_at) END
        FROM refresh_tokens
       GROUP BY family_id, user_id`);
    await q.query(`
      ALTER TABLE refresh_tokens
        ADD CONSTRAINT fk_refresh_tokens_family FOREIGN KEY (family_id) REFERENCES token_families (id) ON DELETE CASCADE`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE refresh_tokens DROP CONSTRAINT fk_refresh_tokens_family`);
    await q.query(`DROP TABLE token_families`);
  }
}
