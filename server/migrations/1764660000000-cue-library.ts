/** The team's cue library: short technique cues grouped by phase; archived cues keep their history. */
import { MigrationInterface, QueryRunner } from 'typeorm';

export class CueLibrary1764660000000 implements MigrationInterface {
  name = 'CueLibrary1764660000000';

  public async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE cues (
        team_id uuid NOT NULL,
        id uuid NOT NULL,
        phase text NOT NULL,
        label text NOT NULL,
        sort_order integer NOT NULL DEFAULT 0,
        archived_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT pk_cues PRIMARY KEY (team_id, id),
        CONSTRAINT fk_cues_team FOREIGN KEY (team_id) REFERENCES teams (id) ON DELETE CASCADE,
        CONSTRAINT ck_cues_phase CHECK (phase IN ('start', 'opening', 'straight', 'curve', 'exit', 'pacing')),
        CONSTRAINT ck_cues_label_length CHECK (char_length(label) BETWEEN 2 AND 60)
      )`);
    await q.query(`CREATE INDEX ix_cues_team_phase_order ON cues (team_id, phase, sort_order)`);
  }

  public async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE cues`);
  }
}
