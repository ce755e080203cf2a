/**
 * Evening review benchmark (`npm run bench`, `BENCH_ONLY=review`; issue #10 §7): the review's count
 * routes and the CSV export over a year of a big squad's notes, each beside a raw SQL baseline
 * measured in the same run.
 *
 * Seed: a head coach signs up through the API (the team gets the default cue library, about thirty
 * cues), sets the team's zone to Europe/Amsterdam (two clock changes inside the year), adds one group
 * and 40 skaters in it. Then, straight into PostgreSQL, one session per day and 500,000 observations
 * over 53 ISO weeks (06:00-22:00 local, every skater, every cue, about 40% good, 1% deleted), each
 * stamped with a server_seq from a block reserved on the team's counter (so pulls would see them
 * in order) and a per-field clock like a device's. VACUUM ANALYZE afterwards (the notes and the
 * kept week counts the triggers wrote), as autovacuum would.
 *
 * Measured over HTTP against the bench server, BENCH_REVIEW_RUNS times each after a warm-up, one
 * request at a time, the route and its baseline alternating (time to the answer's last byte):
 *
 *   (a) group matrix    GET review/groups/:groupId/weeks?from&to   40 skaters x 52 weeks
 *   (b) skater matrix   GET review/skaters/:skaterId/weeks?from&to  one skater x 52 weeks
 *   (c) one-week grid   GET review/week/:week?groupId                 40 skaters x cues
 *   (d) CSV export      GET review/export.csv?kind=observations&from&to&skaterIds  ~100,000 rows
 *
 * The baseline of (a)-(c) is the same count written by hand as one plain GROUP BY through pg (week
 * labels by to_char in the team's zone); the route's answer is checked against it (cells and
 * totals). The baseline of (d) is psql's COPY (SELECT the same rows, joins and columns, one
 * statement) TO STDOUT WITH CSV; the export's rows are counted with csv-parse. A route that is not
 * there (404) is reported as skipped, with why. Figures, not assertions (goals: matrix p95 <= 100 ms, export <= 2 s).
 */
import { spawn } from 'node:child_process';
import { performance } from 'node:perf_hooks';
import { parse as parseCsv } from 'csv-parse/sync';
import { Client } from 'pg';
import { v7 as uuidv7 } from 'uuid';
import { addIsoWeeks, weekOf, weekStartDay } from '../shared/weeks';
import { api, BASE, quantile } from './support';

const DATABASE_URL = process.env.DATABASE_URL;
const SKATERS = Number(process.env.BENCH_REVIEW_SKATERS ?? 40);
const ROWS = Number(process.env.BENCH_REVIEW_ROWS ?? 500_000);
const RUNS = Number(process.env.BENCH_REVIEW_RUNS ?? 50);
const WARMUP = Number(process.env.BENCH_REVIEW_WARMUP ?? 5);
const EXPORT_ROWS = Number(process.env.BENCH_REVIEW_EXPORT_ROWS ?? 100_000);
const EXPORT_RUNS = Number(process.env.BENCH_REVIEW_EXPORT_RUNS ?? 5);
/** An export that has not ended after this long is reported as such (the goal is 2 s). */
const EXPORT_TIMEOUT_MS = Number(process.env.BENCH_REVIEW_EXPORT_TIMEOUT_MS ?? 180_000);
const TIME_ZONE = 'Europe/Amsterdam';
/** Weeks seeded; the matrices ask for the last 52 of them (one more before, so the range cuts). */
const SEED_WEEKS = 53;
const RANGE_WEEKS = 52;
const PASSWORD = 'bench-password-123';
const CHUNK = 100_000;

const int = (n: number) => Math.round(n).toLocaleString('en-US');
const ms = (n: number) => `${n.toFixed(1)} ms`;
const stats = (values: number[]) => ({ p50: quantile(values, 0.5), p95: quantile(values, 0.95), max: Math.max(...values) });

interface Seeded {
  email: string;
  teamId: string;
  userId: string;
  groupId: string;
  skaterIds: string[];
  cueIds: string[];
  firstDay: string;
  lastDay: string;
  from: string;
  to: string;
}

async function signIn(email: string): Promise<string> {
  const session = await api<{ accessToken: string }>('/api/auth/sign-in', { email, password: PASSWORD });
  return session.accessToken;
}

async function patch(path: string, body: unknown, token: string) {
  const response = await fetch(`${BASE}${path}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/json', origin: BASE, authorization: `Bearer ${token}` },
    body: JSON.stringify(body),
  });
  if (!response.ok) throw new Error(`PATCH ${path}: ${response.status} ${await response.text()}`);
}

const addDays = (day: string, n: number) => new Date(Date.parse(`${day}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

async function seed(db: Client): Promise<Seeded> {
  const email = `bench.review.${Date.now()}@bench.example`;
  const signedUp = await api<{ accessToken: string; user: { id: string }; memberships: { teamId: string }[] }>('/api/auth/sign-up', {
    email,
    password: PASSWORD,
    displayName: 'Bench Head Coach',
    teamName: 'Review Bench Squad',
  });
  const token = signedUp.accessToken;
  const teamId = signedUp.memberships[0].teamId;
  await patch(`/api/teams/${teamId}/settings`, { timeZone: TIME_ZONE }, token);
  const group = await api<{ id: string }>(`/api/teams/${teamId}/groups`, { name: 'Bench Long Track' }, token);
  const skaterIds: string[] = [];
  for (let i = 0; i < SKATERS; i += 1) {
    const skater = await api<{ id: string }>(
      `/api/teams/${teamId}/skaters`,
      { displayName: `Bench Skater ${String(i + 1).padStart(2, '0')}`, groupId: group.id },
      token,
    );
    skaterIds.push(skater.id);
  }
  const cueIds = (await api<{ id: string }[]>(`/api/teams/${teamId}/cues`, undefined, token)).map((c) => c.id);

  // The last complete week in the team's zone, and the 52 before it.
  const to = addIsoWeeks(weekOf(Date.now(), TIME_ZONE), -1);
  const seedFrom = addIsoWeeks(to, -(SEED_WEEKS - 1));
  const from = addIsoWeeks(to, -(RANGE_WEEKS - 1));
  const firstDay = weekStartDay(seedFrom);
  const days = SEED_WEEKS * 7;
  const lastDay = addDays(firstDay, days - 1);

  const started = performance.now();
  const sessionIds = Array.from({ length: days }, () => uuidv7());
  await db.query('BEGIN');
  // Sessions first, numbered from a block reserved on the team's counter, then the notes in
  // chunks, each chunk with its own block: server_seq rises in the order rows were written.
  await db.query(
    `WITH reserved AS (
       INSERT INTO team_counters (team_id, seq) VALUES ($1, $3) ON CONFLICT (team_id) DO UPDATE SET seq = team_counters.seq + $3
       RETURNING seq - $3 AS base
     )
     INSERT INTO sessions (team_id, id, day, rink, title, focus_cue_ids, created_at, created_by, field_hlc, server_seq)
     SELECT $1, s.id, to_char($4::date + (s.n - 1)::int, 'YYYY-MM-DD'), 'Bench Oval', 'Ice time', '[]',
            ($4::date + (s.n - 1)::int + time '06:00') AT TIME ZONE $5, $2,
            jsonb_build_object('day', h.v, 'rink', h.v, 'title', h.v, 'createdAt', h.v, 'createdBy', h.v),
            reserved.base + s.n
       FROM reserved, unnest($6::uuid[]) WITH ORDINALITY AS s(id, n),
            LATERAL (SELECT lpad((extract(epoch FROM ($4::date + (s.n - 1)::int + time '06:00') AT TIME ZONE $5) * 1000)::bigint::text, 15, '0')
                            || '-000000-bench-seed' AS v) h`,
    [teamId, signedUp.user.id, days, firstDay, TIME_ZONE, sessionIds],
  );
  for (let offset = 0; offset < ROWS; offset += CHUNK) {
    const count = Math.min(CHUNK, ROWS - offset);
    // Row i: day i * days / ROWS (the days in order, as notes arrive from the rink: the table's
    // rows lie roughly in time order, as they do in use), skater i mod 40, a cue that walks the
    // library at another pace, 06:00-21:59 local, 2 in 5 good, 1 in 100 deleted an hour later
    // (a tombstone: never counted).
    await db.query(
      `WITH reserved AS (
         INSERT INTO team_counters (team_id, seq) VALUES ($1, $3) ON CONFLICT (team_id) DO UPDATE SET seq = team_counters.seq + $3
         RETURNING seq - $3 AS base
       ),
       rows AS (
         SELECT g.i, g.i - $4 + 1 AS n,
                (($5::date + ((g.i * $6) / $11)::int + time '06:00' + make_interval(mins => ((g.i * 37) % 960)::int, secs => (g.i % 60)::int))
                   AT TIME ZONE $7) AS created_at
           FROM generate_series($4::bigint, $4::bigint + $3 - 1) AS g(i)
       )
       INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by,
                                 author_name, field_hlc, server_seq, deleted_at, deleted_hlc)
       SELECT $1, gen_random_uuid(), ($8::uuid[])[1 + (r.i * $6) / $11], ($9::uuid[])[1 + r.i % array_length($9::uuid[], 1)],
              ($10::uuid[])[1 + (r.i + r.i / array_length($9::uuid[], 1)) % array_length($10::uuid[], 1)],
              CASE WHEN (r.i * 13) % 5 < 2 THEN 'good' ELSE 'needs_work' END,
              CASE WHEN r.i % 7 = 0 THEN 'Knee over toe on the exit of the curve' WHEN r.i % 11 = 0 THEN 'Arms quiet, "relaxed", on the straight' ELSE '' END,
              r.i % 7 = 0, r.created_at, $2, 'Bench Head Coach',
              jsonb_build_object('sessionId', h.v, 'skaterId', h.v, 'cueId', h.v, 'mark', h.v, 'note', h.v, 'noteShared', h.v,
                                 'createdAt', h.v, 'createdBy', h.v),
              reserved.base + r.n,
              CASE WHEN r.i % 100 = 99 THEN r.created_at + interval '1 hour' END,
              CASE WHEN r.i % 100 = 99 THEN lpad(((extract(epoch FROM r.created_at) + 3600) * 1000)::bigint::text, 15, '0') || '-000000-bench-seed' END
         FROM reserved, rows r,
              LATERAL (SELECT lpad((extract(epoch FROM r.created_at) * 1000)::bigint::text, 15, '0') || '-000000-bench-seed' AS v) h`,
      [teamId, signedUp.user.id, count, offset, firstDay, days, TIME_ZONE, sessionIds, skaterIds, cueIds, ROWS],
    );
  }
  await db.query('COMMIT');
  const seeded = performance.now();
  await db.query('VACUUM ANALYZE observations');
  await db.query('VACUUM ANALYZE sessions');
  await db.query('VACUUM ANALYZE observation_week_counts');
  console.log(
    `seeded ${int(ROWS)} observations (${int(ROWS / 100)} of them deleted) and ${days} sessions over ${SEED_WEEKS} ISO weeks ` +
      `(${firstDay} .. ${lastDay}, ${TIME_ZONE}), ${SKATERS} skaters in one group, ${cueIds.length} cues: ` +
      `${((seeded - started) / 1000).toFixed(1)} s to write, ${((performance.now() - seeded) / 1000).toFixed(1)} s to VACUUM ANALYZE`,
  );
  return { email, teamId, userId: signedUp.user.id, groupId: group.id, skaterIds, cueIds, firstDay, lastDay, from, to };
}

// ---- measuring ------------------------------------------------------------------------------

type Fetched = { status: number; text: string; ms: number };

/** A GET as a browser makes it (fetch asks for gzip/br, as a browser does): ms to the last byte. */
async function get(path: string, token: string, timeoutMs = 60_000): Promise<Fetched> {
  const started = performance.now();
  const response = await fetch(`${BASE}${path}`, {
    headers: { origin: BASE, authorization: `Bearer ${token}` },
    signal: AbortSignal.timeout(timeoutMs),
  });
  const text = await response.text();
  return { status: response.status, text, ms: performance.now() - started };
}

/** Cells as "row|column" -> "needs work/good", the same shape from the route and from SQL. */
type Cells = Map<string, string>;

interface Case {
  label: string;
  path: string;
  raw: () => Promise<Cells>;
  cells: (body: string) => Cells;
}

const total = (cells: Cells) =>
  [...cells.values()].reduce((sum, v) => {
    const [a, b] = v.split('/').map(Number);
    return sum + a + b;
  }, 0);

function sameCells(a: Cells, b: Cells): string | null {
  if (a.size !== b.size) return `${a.size} cells vs ${b.size}`;
  for (const [key, value] of a) if (b.get(key) !== value) return `cell ${key}: ${value} vs ${b.get(key) ?? 'none'}`;
  return null;
}

async function measure(c: Case, token: string) {
  const first = await get(c.path, token);
  if (first.status !== 200) {
    console.log(`  ${c.label}: the route answered ${first.status} (${first.text.slice(0, 200)}): skipped`);
    return;
  }
  const expected = await c.raw();
  const mismatch = sameCells(c.cells(first.text), expected);
  for (let i = 0; i < WARMUP; i += 1) {
    await get(c.path, token);
    await c.raw();
  }
  const route: number[] = [];
  const raw: number[] = [];
  let bytes = 0;
  for (let i = 0; i < RUNS; i += 1) {
    const r = await get(c.path, token);
    if (r.status !== 200) throw new Error(`${c.label}: ${r.status} ${r.text.slice(0, 200)}`);
    route.push(r.ms);
    bytes = r.text.length;
    const started = performance.now();
    await c.raw();
    raw.push(performance.now() - started);
  }
  const a = stats(route);
  const b = stats(raw);
  console.log(`  ${c.label}: ${int(expected.size)} cells, ${int(total(expected))} marks, ${int(bytes)} bytes of JSON, ${RUNS} runs`);
  console.log(`    route     p50 ${ms(a.p50)}  p95 ${ms(a.p95)}  max ${ms(a.max)}`);
  console.log(`    raw SQL   p50 ${ms(b.p50)}  p95 ${ms(b.p95)}  max ${ms(b.max)}`);
  console.log(`    ratio route / raw: p50 ${(a.p50 / b.p50).toFixed(2)}, p95 ${(a.p95 / b.p95).toFixed(2)}`);
  console.log(`    answer ${mismatch ? `DIFFERS from the raw count: ${mismatch}` : 'checked: the same cells and counts as the raw count'}`);
  return { route: a, raw: b };
}

/**
 * The machine's floor in the same run: an authenticated route that reads one row (the team's
 * settings), same sign-in and membership checks as the review's routes. What is left above it is
 * the review's own work; on a 2-core machine shared with builds and tests it is far from zero.
 */
async function floor(path: string, token: string) {
  for (let i = 0; i < WARMUP; i += 1) await get(path, token);
  const times: number[] = [];
  for (let i = 0; i < RUNS; i += 1) times.push((await get(path, token)).ms);
  const f = stats(times);
  console.log(`  (floor: GET .../settings, one row behind the same checks: p50 ${ms(f.p50)}  p95 ${ms(f.p95)}  max ${ms(f.max)}, ${RUNS} runs)`);
}

const weekSql = `to_char(o.created_at AT TIME ZONE $2, 'IYYY-"W"IW')`;
const rangeSql = `o.created_at >= ($3::date::timestamp AT TIME ZONE $2) AND o.created_at < ($4::date::timestamp AT TIME ZONE $2)`;

async function rawMatrix(db: Client, teamId: string, skaterIds: string[], from: string, to: string): Promise<Cells> {
  const { rows } = await db.query<{ cue_id: string; week: string; needs_work: number; good: number }>(
    `SELECT o.cue_id, ${weekSql} AS week,
            count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work, count(*) FILTER (WHERE o.mark = 'good')::int AS good
       FROM observations o
      WHERE o.team_id = $1 AND o.deleted_at IS NULL AND ${rangeSql} AND o.skater_id = ANY($5::uuid[])
      GROUP BY 1, 2`,
    [teamId, TIME_ZONE, weekStartDay(from), weekStartDay(addIsoWeeks(to, 1)), skaterIds],
  );
  return new Map(rows.map((r) => [`${r.cue_id}|${r.week}`, `${r.needs_work}/${r.good}`]));
}

function matrixCells(body: string): Cells {
  const matrix = JSON.parse(body) as { rows: { cueId: string; counts: { week: string; needsWork: number; good: number }[] }[] };
  const cells: Cells = new Map();
  for (const row of matrix.rows) for (const c of row.counts) cells.set(`${row.cueId}|${c.week}`, `${c.needsWork}/${c.good}`);
  return cells;
}

async function rawWeek(db: Client, teamId: string, skaterIds: string[], week: string): Promise<Cells> {
  const { rows } = await db.query<{ skater_id: string; cue_id: string; needs_work: number; good: number }>(
    `SELECT o.skater_id, o.cue_id,
            count(*) FILTER (WHERE o.mark = 'needs_work')::int AS needs_work, count(*) FILTER (WHERE o.mark = 'good')::int AS good
       FROM observations o
      WHERE o.team_id = $1 AND o.deleted_at IS NULL AND ${rangeSql} AND o.skater_id = ANY($5::uuid[])
      GROUP BY 1, 2`,
    [teamId, TIME_ZONE, weekStartDay(week), weekStartDay(addIsoWeeks(week, 1)), skaterIds],
  );
  return new Map(rows.map((r) => [`${r.skater_id}|${r.cue_id}`, `${r.needs_work}/${r.good}`]));
}

function weekCells(body: string): Cells {
  const grid = JSON.parse(body) as { cells: { skaterId: string; cueId: string; needsWork: number; good: number }[] };
  return new Map(grid.cells.map((c) => [`${c.skaterId}|${c.cueId}`, `${c.needsWork}/${c.good}`]));
}

// ---- the CSV export -------------------------------------------------------------------------

/** The same rows through psql's COPY ... TO STDOUT WITH CSV: milliseconds to the last byte, and lines. */
function copyCsv(sql: string): Promise<{ ms: number; lines: number }> {
  const url = new URL(DATABASE_URL!);
  return new Promise((resolve, reject) => {
    const started = performance.now();
    // The password goes in the environment, never on a command line.
    const child = spawn('psql', ['-X', '-q', '-v', 'ON_ERROR_STOP=1', '-c', `COPY (${sql}) TO STDOUT WITH (FORMAT csv, HEADER)`], {
      env: {
        ...process.env,
        PGHOST: url.hostname,
        PGPORT: url.port,
        PGUSER: decodeURIComponent(url.username),
        PGPASSWORD: decodeURIComponent(url.password),
        PGDATABASE: url.pathname.slice(1),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let lines = 0;
    let errors = '';
    child.stdout.on('data', (chunk: Buffer) => {
      for (let i = chunk.indexOf(10); i !== -1; i = chunk.indexOf(10, i + 1)) lines += 1;
    });
    child.stderr.on('data', (chunk: Buffer) => (errors += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) reject(new Error(`psql COPY failed (${code}): ${errors}`));
      else resolve({ ms: performance.now() - started, lines });
    });
  });
}

async function measureExport(db: Client, s: Seeded, token: string) {
  // The matrices' 52 weeks as local days (an export covers at most 366 days), and skaters in seed
  // order while their live notes in those days come nearer to EXPORT_ROWS.
  const fromDay = weekStartDay(s.from);
  const toDay = s.lastDay;
  const { rows: perSkater } = await db.query<{ skater_id: string; n: number }>(
    `SELECT skater_id, count(*)::int AS n FROM observations o
      WHERE team_id = $1 AND deleted_at IS NULL AND ${rangeSql}
      GROUP BY 1`,
    [s.teamId, TIME_ZONE, fromDay, addDays(toDay, 1)],
  );
  const counts = new Map(perSkater.map((r) => [r.skater_id, r.n]));
  const chosen: string[] = [];
  let expected = 0;
  for (const id of s.skaterIds) {
    const n = counts.get(id) ?? 0;
    // One more skater only while that brings the total nearer to EXPORT_ROWS.
    if (chosen.length > 0 && Math.abs(expected + n - EXPORT_ROWS) >= Math.abs(expected - EXPORT_ROWS)) break;
    chosen.push(id);
    expected += n;
  }
  const path = `/api/teams/${s.teamId}/review/export.csv?kind=observations&from=${fromDay}&to=${toDay}&skaterIds=${chosen.join(',')}`;
  console.log(`  (d) CSV export: ${chosen.length} skaters, ${fromDay} .. ${toDay} (${int(expected)} live notes in those days)`);
  let first: Fetched;
  try {
    first = await get(path, token, EXPORT_TIMEOUT_MS);
  } catch (error) {
    console.log(`    skipped: no whole answer within ${EXPORT_TIMEOUT_MS / 1000} s (${(error as Error).name}: ${(error as Error).message})`);
    return;
  }
  if (first.status === 404) {
    console.log(
      `    skipped: GET .../review/export.csv answered 404 (${first.text.slice(0, 160)}): the export route is not in this build yet ` +
        '(server/routes/review-export.ts mounts no route), so there is nothing to time',
    );
    return;
  }
  if (first.status !== 200) {
    console.log(`    skipped: the export answered ${first.status}: ${first.text.slice(0, 300)}`);
    return;
  }
  const records = parseCsv(first.text, { bom: true, relax_column_count: false }) as string[][];
  const header = records[0] ?? [];
  const exportedRows = records.length - 1;
  const route: number[] = [];
  const raw: number[] = [];
  let rawLines = 0;
  // The same rows, joins and columns as the export reads, in one statement, written by psql.
  const tz = `'${TIME_ZONE}'`;
  const rawSql = `
    SELECT to_char(o.created_at AT TIME ZONE ${tz}, 'YYYY-MM-DD') AS day,
           to_char(o.created_at AT TIME ZONE ${tz}, 'IYYY-"W"IW') AS week,
           to_char(o.created_at AT TIME ZONE ${tz}, 'YYYY-MM-DD"T"HH24:MI:SS') AS local_time,
           s.display_name AS skater, g.name AS skater_group, c.phase, c.label AS cue, o.mark, o.note, o.note_shared,
           coalesce(nullif(o.author_name, ''), u.display_name, '') AS coach, se.title AS session, se.day AS session_day,
           o.skater_id, o.cue_id, o.session_id, o.id
      FROM observations o
      JOIN skaters s ON s.team_id = o.team_id AND s.id = o.skater_id
      LEFT JOIN skater_groups g ON g.team_id = o.team_id AND g.id = s.group_id
      LEFT JOIN cues c ON c.team_id = o.team_id AND c.id = o.cue_id
      LEFT JOIN sessions se ON se.team_id = o.team_id AND se.id = o.session_id
      LEFT JOIN users u ON u.id = o.created_by
     WHERE o.team_id = '${s.teamId}' AND o.deleted_at IS NULL
       AND o.created_at >= ('${fromDay}'::date::timestamp AT TIME ZONE ${tz})
       AND o.created_at < ('${addDays(toDay, 1)}'::date::timestamp AT TIME ZONE ${tz})
       AND o.skater_id IN (${chosen.map((id) => `'${id}'`).join(', ')})
     ORDER BY o.created_at, o.id`;
  await copyCsv(rawSql);
  for (let i = 0; i < EXPORT_RUNS; i += 1) {
    const r = await get(path, token, EXPORT_TIMEOUT_MS);
    if (r.status !== 200) throw new Error(`export: ${r.status} ${r.text.slice(0, 200)}`);
    route.push(r.ms);
    const copied = await copyCsv(rawSql);
    raw.push(copied.ms);
    rawLines = copied.lines;
  }
  const a = stats(route);
  const b = stats(raw);
  console.log(`    rows received (csv-parse, header left out): ${int(exportedRows)}; header: ${header.join(', ')}`);
  console.log(`    export    p50 ${ms(a.p50)}  p95 ${ms(a.p95)}  max ${ms(a.max)}   (${int(first.text.length)} characters, ${EXPORT_RUNS} runs)`);
  console.log(`    raw COPY  p50 ${ms(b.p50)}  p95 ${ms(b.p95)}  max ${ms(b.max)}   (${int(rawLines - 1)} rows, psql COPY ... TO STDOUT WITH CSV)`);
  console.log(`    ratio export / raw: p50 ${(a.p50 / b.p50).toFixed(2)}, p95 ${(a.p95 / b.p95).toFixed(2)}   (goal: export <= 2000 ms)`);
  if (exportedRows !== expected) console.log(`    note: ${int(exportedRows)} rows exported, ${int(expected)} live notes in the range`);
}

// ---- the run ----------------------------------------------------------------------------------

async function main() {
  if (!DATABASE_URL) throw new Error('DATABASE_URL must point at the bench database (scripts/bench.sh sets it)');
  const db = new Client({ connectionString: DATABASE_URL, application_name: 'boardside-bench-review' });
  await db.connect();
  try {
    const s = await seed(db);
    const week = addIsoWeeks(s.to, -10);
    const skater = s.skaterIds[0];
    const range = `from=${s.from}&to=${s.to}`;
    console.log(`review counts: ${s.from} .. ${s.to} (${RANGE_WEEKS} weeks), ${WARMUP} warm-up runs, then ${RUNS}, route and raw SQL alternating`);
    const cases: Case[] = [
      {
        label: `(a) group matrix, ${SKATERS} skaters x ${RANGE_WEEKS} weeks`,
        path: `/api/teams/${s.teamId}/review/groups/${s.groupId}/weeks?${range}`,
        raw: () => rawMatrix(db, s.teamId, s.skaterIds, s.from, s.to),
        cells: matrixCells,
      },
      {
        label: `(b) skater matrix, 1 skater x ${RANGE_WEEKS} weeks`,
        path: `/api/teams/${s.teamId}/review/skaters/${skater}/weeks?${range}`,
        raw: () => rawMatrix(db, s.teamId, [skater], s.from, s.to),
        cells: matrixCells,
      },
      {
        label: `(c) one-week grid, ${week}, ${SKATERS} skaters x cues`,
        path: `/api/teams/${s.teamId}/review/week/${week}?groupId=${s.groupId}`,
        raw: () => rawWeek(db, s.teamId, s.skaterIds, week),
        cells: weekCells,
      },
    ];
    for (const c of cases) await measure(c, await signIn(s.email));
    await floor(`/api/teams/${s.teamId}/settings`, await signIn(s.email));
    console.log('  goal: the matrix p95 <= 100 ms on this machine');
    await measureExport(db, s, await signIn(s.email));
  } finally {
    await db.end();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
