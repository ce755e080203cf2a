/**
 * The per-team counter behind `server_seq` (shared/SYNC.md, "Server order"). Bumping the team's
 * one row takes its row lock until the transaction ends, so a transaction that draws later
 * numbers cannot commit before one holding earlier numbers: a pull cursor built on these numbers
 * never skips a row that commits late. Plain sequences do not give that.
 *
 * Every write to a synced table (sessions, observations, cues, skaters, skater_groups) stamps its
 * rows from here, inside the transaction that writes them.
 */
import type { DataSource, EntityManager, QueryRunner } from 'typeorm';

type Db = DataSource | EntityManager | QueryRunner;

async function rows<T>(db: Db, sql: string, params: unknown[]): Promise<T[]> {
  const runner = 'manager' in db && 'connection' in db && 'isReleased' in db ? (db as QueryRunner) : undefined;
  if (runner) return (await runner.query(sql, params, true)).records as T[];
  // DataSource / EntityManager: INSERT ... RETURNING answers the rows themselves.
  return (await (db as DataSource | EntityManager).query(sql, params)) as T[];
}

/**
 * Reserves `count` numbers for the team and returns the first (the last is first + count - 1).
 * Creates the counter row if the team has none yet. Must run inside the writing transaction.
 */
export async function nextSeqs(db: Db, teamId: string, count: number): Promise<number> {
  const [row] = await rows<{ seq: string }>(
    db,
    `INSERT INTO team_counters (team_id, seq) VALUES ($1, $2)
     ON CONFLICT (team_id) DO UPDATE SET seq = team_counters.seq + excluded.seq
     RETURNING seq`,
    [teamId, count],
  );
  return Number(row.seq) - count + 1;
}

/** Locks the team's counter row (creating it when missing) and returns its current value. */
export async function lockCounter(db: Db, teamId: string): Promise<number> {
  return (await nextSeqs(db, teamId, 0)) - 1;
}
