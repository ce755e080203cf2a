/**
 * Foundation schema: teams, users, memberships, skater groups and profiles, invitations,
 * refresh tokens and password resets. Team-owned tables lead every key with team_id so the
 * schema can later be distributed by team (see shared/SYNC.md, "Server order").
 */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class Foundation1764650000000 implements MigrationInterface {
  name = 'Foundation1764650000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE teams (
        id uuid NOT NULL,
        name text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_teams PRIMARY KEY (id)
      )`);
    await q.query(`
      CREATE TABLE users (
        id uuid NOT NULL,
        email text NOT NULL,
        password_hash text NOT NULL,
        display_name text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_users PRIMARY KEY (id),
        CONSTRAINT uq_users_email UNIQUE (email),
        CONSTRAINT ck_users_email_lower CHECK (email = lower(email))
      )`);
    await q.query(`
      CREATE TABLE skater_groups (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        name text NOT NULL,
        sort_order integer NOT NULL DEFAULT 0,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_skater_groups PRIMARY KEY (team_id, id),
        CONSTRAINT fk_skater_groups_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE
      )`);
    await q.query(`
      CREATE TABLE skaters (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        display_name text NOT NULL,
        group_id uuid NULL,
        user_id uuid NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_skaters PRIMARY KEY (team_id, id),
        CONSTRAINT fk_skaters_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_skaters_group FOREIGN KEY (team_id, group_id) REFERENCES skater_groups (team_id, id),
        CONSTRAINT fk_skaters_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE SET NULL,
        CONSTRAINT uq_skaters_team_user UNIQUE (team_id, user_id)
      )`);
    await q.query(`CREATE INDEX ix_skaters_team_group ON skaters (team_id, group_id)`);
    await q.query(`
      CREATE TABLE memberships (
        team_id uuid NOT NULL,
        user_id uuid NOT NULL,
        role text NOT NULL,
        skater_id uuid NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_memberships PRIMARY KEY (team_id, user_id),
        CONSTRAINT fk_memberships_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_memberships_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE CASCADE,
        CONSTRAINT fk_memberships_skater FOREIGN KEY (team_id, skater_id) REFERENCES skaters (team_id, id),
        CONSTRAINT ck_memberships_role CHECK (role IN ('head_coach', 'coach', 'skater', 'guardian')),
        CONSTRAINT ck_memberships_skater_link CHECK ((role IN ('skater', 'guardian')) = (skater_id IS NOT NULL))
      )`);
    await q.query(`CREATE INDEX ix_memberships_user ON memberships (user_id)`);
    await q.query(`
      CREATE TABLE invitations (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        email text NOT NULL,
        role text NOT NULL,
        skater_id uuid NULL,
        token_hash text NOT NULL,
        invited_by uuid NOT NULL,
        expires_at timestamptz NOT NULL,
        accepted_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_invitations PRIMARY KEY (team_id, id),
        CONSTRAINT fk_invitations_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT fk_invitations_skater FOREIGN KEY (team_id, skater_id) REFERENCES skaters (team_id, id),
        CONSTRAINT fk_invitations_invited_by FOREIGN KEY (invited_by) REFERENCES users (id),
        CONSTRAINT ck_invitations_role CHECK (role IN ('coach', 'skater', 'guardian')),
        CONSTRAINT ck_invitations_skater_link CHECK ((role IN ('skater', 'guardian')) = (skater_id IS NOT NULL))
      )`);
    await q.query(`CREATE INDEX ix_invitations_token_hash ON invitations (token_hash)`);
    await q.query(`
      CREATE TABLE refresh_tokens (
        id uuid NOT NULL,
        user_id uuid NOT NULL,
        family_id uuid NOT NULL,
        token_hash text NOT NULL,
        expires_at timestamptz NOT NULL,
        used_at timestamptz NULL,
        revoked_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_refresh_tokens PRIMARY KEY (id),
        CONSTRAINT uq_refresh_tokens_token_hash UNIQUE (token_hash),
        CONSTRAINT fk_refresh_tokens_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE CASCADE
      )`);
    await q.query(`CREATE INDEX ix_refresh_tokens_family ON refresh_tokens (family_id)`);
    await q.query(`
      CREATE TABLE password_resets (
        id uuid NOT NULL,
        user_id uuid NOT NULL,
        token_hash text NOT NULL,
        expires_at timestamptz NOT NULL,
        used_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_password_resets PRIMARY KEY (id),
        CONSTRAINT uq_password_resets_token_hash UNIQUE (token_hash),
        CONSTRAINT fk_password_resets_user FOREIGN KEY (user_id) REFERENCES users (id) ON DELETE CASCADE
      )`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE password_resets`);
    await q.query(`DROP TABLE refresh_tokens`);
    await q.query(`DROP TABLE invitations`);
    await q.query(`DROP TABLE memberships`);
    await q.query(`DROP TABLE skaters`);
    await q.query(`DROP TABLE skater_groups`);
    await q.query(`DROP TABLE users`);
    await q.query(`DROP TABLE teams`);
  }
}
