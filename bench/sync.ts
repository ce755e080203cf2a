/**
 * Sync throughput benchmark (`npm run bench`, shared/SYNC.md "Speed targets"): the push and pull
 * endpoints against what PostgreSQL does with the same rows when asked directly, in the same run.
 *
 *   raw upsert      observation rows (every column, field_hlc and server_seq included) written
 *                   straight through pg: INSERT ... SELECT FROM unnest(...) ON CONFLICT (team_id, id)
 *                   DO UPDATE, 500 rows per statement.
 *   push, 1 client  the same number of observation create ops through POST /api/sync/push in
 *                   pushes of 500 ops (the device's batch), one after another: HTTP, JSON, zod,
 *                   auth, membership, op_log, merge and the write.
 *   push, 2 clients the same number of ops split over two clients of two teams pushing at once.
 *   raw paged read  keyset pages of 1000 rows: SELECT ... WHERE team_id = $1 AND server_seq > $2
 *                   ORDER BY server_seq LIMIT 1000, until a page comes back short.
 *   pull            GET /api/sync/pull?teamId&cursor&limit=1000 until hasMore is false, over the
 *                   same team (its observations plus its session, cues and skaters).
 *
 * Every measurement is warmed up once with a small batch on a team of its own, then run
 * BENCH_SYNC_RUNS times (fresh teams for every write run, so runs never collide); the table shows
 * the median. Figures and ratios, not assertions: the targets are push / raw upsert >= 0.25 and
 * pull / raw read >= 0.25.
 */
import { performance } from 'node:perf_hooks';
import { Client } from 'pg';
import { v7 as uuidv7 } from 'uuid';
import { HybridClock } from '../shared/hlc';
import { SYNC_PULL_MAX_LIMIT, SYNC_PUSH_MAX_OPS, type Op, type PullReply, type PushReply } from '../shared/schemas/sync';
import { upsertParams, upsertSql, type Stamped } from '../server/services/sync/write';
import { api, BASE } from './support';

const DATABASE_URL = process.env.DATABASE_URL;
const ROWS = Number(process.env.BENCH_SYNC_ROWS ?? 50_000);
const RUNS = Number(process.env.BENCH_SYNC_RUNS ?? 3);
const SKATERS = 12;
const BATCH = SYNC_PUSH_MAX_OPS;
const PAGE = SYNC_PULL_MAX_LIMIT;
const WARMUP_ROWS = 2 * BATCH;

/** The fields a device sends to create an observation (sync/store.ts), one clock value each. */
const OBSERVATION_FIELDS = ['sessionId', 'skaterId', 'cueId', 'mark', 'note', 'noteShared', 'createdAt', 'createdBy'] as const;
const NOTES = ['', '', 'Knee over toe on the exit of the curve', '', 'Arms quiet on the straight', ''];

interface Team {
  label: string;
  email: string;
  token: string;
  teamId: string;
  userId: string;
  clientId: string;
  skaterIds: string[];
  cueIds: string[];
  sessionId: string;
  clock: HybridClock;
  /** When the team's session was made: the push refuses notes from before the team existed. */
  createdMs: number;
}

interface Observation {
  id: string;
  fields: {
    sessionId: string;
    skaterId: string;
    cueId: string;
    mark: 'good' | 'needs_work';
    note: string;
    noteShared: boolean;
    createdAt: string;
    createdBy: string;
  };
  hlc: string;
}

interface Measured {
  rows: number;
  seconds: number;
}

const rate = (m: Measured) => m.rows / m.seconds;
const median = (values: Measured[]) => [...values].sort((a, b) => rate(a) - rate(b))[Math.floor(values.length / 2)];
const int = (n: number) => Math.round(n).toLocaleString('en-US');

let signUps = 0;

async function push(team: Team, ops: Op[]): Promise<void> {
  const reply = await api<PushReply>('/api/sync/push', { clientId: team.clientId, teamId: team.teamId, ops }, team.token);
  const notApplied = reply.results.filter((r) => r.status !== 'applied');
  if (reply.results.length !== ops.length || notApplied.length > 0) {
    throw new Error(`push to ${team.label}: ${notApplied.length} of ${ops.length} ops not applied, e.g. ${JSON.stringify(notApplied[0])}`);
  }
}

/** A head coach with a team of 12 skaters, the team's cues, and one session (created by push). */
async function newTeam(label: string): Promise<Team> {
  signUps += 1;
  const email = `bench.sync.${Date.now()}.${signUps}@bench.example`;
  const signedUp = await api<{ accessToken: string; user: { id: string }; memberships: { teamId: string }[] }>('/api/auth/sign-up', {
    email,
    password: 'bench-password-123',
    displayName: `Bench Coach ${signUps}`,
    teamName: `Sync Bench ${label}`,
  });
  const token = signedUp.accessToken;
  const teamId = signedUp.memberships[0].teamId;
  const skaterIds: string[] = [];
  for (let i = 0; i < SKATERS; i += 1) {
    const skater = await api<{ id: string }>(`/api/teams/${teamId}/skaters`, { displayName: `Skater ${i + 1}` }, token);
    skaterIds.push(skater.id);
  }
  const cueIds = (await api<{ id: string }[]>(`/api/teams/${teamId}/cues`, undefined, token)).map((c) => c.id);
  const clientId = uuidv7();
  const team: Team = {
    label, email, token, teamId, userId: signedUp.user.id, clientId, skaterIds, cueIds,
    sessionId: uuidv7(), clock: new HybridClock(clientId), createdMs: Date.now(),
  };
  const hlc = team.clock.now();
  const createdAt = new Date(team.createdMs).toISOString();
  await push(team, [
    {
      opId: uuidv7(), table: 'sessions', recordId: team.sessionId, kind: 'upsert',
      fields: { day: createdAt.slice(0, 10), rink: 'Bench Oval', title: 'Sync bench', createdAt, createdBy: team.userId },
      hlc: { day: hlc, rink: hlc, title: hlc, createdAt: hlc, createdBy: hlc },
    },
  ]);
  return team;
}

/** `count` observations as a coach taps them at the boards, round the skaters and cues. */
function observations(team: Team, count: number): Observation[] {
  // Within half a second after the team was made (a push refuses instants before the team existed).
  const start = team.createdMs;
  return Array.from({ length: count }, (_, i) => ({
    id: uuidv7(),
    fields: {
      sessionId: team.sessionId,
      skaterId: team.skaterIds[i % team.skaterIds.length],
      cueId: team.cueIds[i % team.cueIds.length],
      mark: i % 3 === 0 ? 'good' : 'needs_work',
      note: NOTES[i % NOTES.length],
      noteShared: i % 12 === 2,
      createdAt: new Date(start + (i % 500)).toISOString(),
      createdBy: team.userId,
    },
    hlc: team.clock.now(),
  }));
}

const toOp = (o: Observation): Op => ({
  opId: uuidv7(),
  table: 'observations',
  recordId: o.id,
  kind: 'upsert',
  fields: o.fields,
  hlc: Object.fromEntries(OBSERVATION_FIELDS.map((f) => [f, o.hlc])),
});

const batches = <T>(items: T[], size: number) =>
  Array.from({ length: Math.ceil(items.length / size) }, (_, i) => items.slice(i * size, (i + 1) * size));

// ---- raw PostgreSQL ---------------------------------------------------------------------------

/** The very statement the push endpoint writes observations with. */
const RAW_UPSERT = upsertSql('observations');

async function rawUpsert(db: Client, team: Team, rows: Observation[]): Promise<Measured> {
  let seq = 1_000_000;
  const started = performance.now();
  for (const batch of batches(rows, BATCH)) {
    // The push's own parameters for these rows (upsertParams), so the raw statement follows the table's description.
    const stamped: Stamped[] = batch.map((o) => ({
      record: {
        table: 'observations',
        id: o.id,
        exists: false,
        values: { ...o.fields, authorName: '', acknowledgedAt: null },
        fieldHlc: Object.fromEntries(OBSERVATION_FIELDS.map((f) => [f, o.hlc])),
        deletedAt: null,
        deletedHlc: null,
        ghost: false,
        formerOwners: [],
        dirty: true,
      },
      serverSeq: seq++,
    }));
    await db.query(RAW_UPSERT, upsertParams('observations', team.teamId, stamped));
  }
  return { rows: rows.length, seconds: (performance.now() - started) / 1000 };
}

const RAW_PAGE = `
  SELECT id, server_seq, deleted_at, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by, acknowledged_at
    FROM observations WHERE team_id = $1 AND server_seq > $2 ORDER BY server_seq LIMIT ${PAGE}`;

async function rawRead(db: Client, team: Team, maxPages = Infinity): Promise<Measured> {
  let cursor = 0;
  let rows = 0;
  const started = performance.now();
  for (let page = 0; page < maxPages; page += 1) {
    const result = await db.query<{ server_seq: string }>(RAW_PAGE, [team.teamId, cursor]);
    rows += result.rows.length;
    if (result.rows.length < PAGE) break;
    cursor = Number(result.rows[result.rows.length - 1].server_seq);
  }
  return { rows, seconds: (performance.now() - started) / 1000 };
}

// ---- the endpoints ----------------------------------------------------------------------------

async function pushAll(team: Team, ops: Op[]): Promise<Measured> {
  const started = performance.now();
  for (const batch of batches(ops, BATCH)) await push(team, batch);
  return { rows: ops.length, seconds: (performance.now() - started) / 1000 };
}

async function pushConcurrently(clients: { team: Team; ops: Op[] }[]): Promise<Measured> {
  const started = performance.now();
  await Promise.all(clients.map(async ({ team, ops }) => {
    for (const batch of batches(ops, BATCH)) await push(team, batch);
  }));
  return { rows: clients.reduce((n, c) => n + c.ops.length, 0), seconds: (performance.now() - started) / 1000 };
}

async function pullAll(team: Team, maxPages = Infinity): Promise<Measured> {
  let cursor = 0;
  let rows = 0;
  const started = performance.now();
  for (let page = 0; page < maxPages; page += 1) {
    const reply = await api<PullReply>(`/api/sync/pull?teamId=${team.teamId}&cursor=${cursor}&limit=${PAGE}`, undefined, team.token);
    rows += reply.changes.length + reply.tombstones.length;
    cursor = reply.nextCursor;
    if (!reply.hasMore) break;
  }
  return { rows, seconds: (performance.now() - started) / 1000 };
}

// ---- the run ----------------------------------------------------------------------------------

async function main() {
  if (!DATABASE_URL) throw new Error('DATABASE_URL must point at the bench database (scripts/bench.sh sets it)');
  const db = new Client({ connectionString: DATABASE_URL, application_name: 'boardside-bench-sync' });
  await db.connect();
  try {
    const half = Math.floor(ROWS / 2);
    console.log(`sync throughput: ${int(ROWS)} observations, pushes of ${BATCH} ops, pages of ${PAGE} rows, ${SKATERS} skaters per team, median of ${RUNS} runs`);

    // Warm-up: each measurement once, small, on a team of its own.
    const warm = await newTeam('warm-up');
    const warmRows = observations(warm, WARMUP_ROWS * 2);
    await rawUpsert(db, warm, warmRows.slice(0, WARMUP_ROWS));
    await pushAll(warm, warmRows.slice(WARMUP_ROWS).map(toOp));
    await rawRead(db, warm, 2);
    await pullAll(warm, 2);

    const results = { raw: [] as Measured[], push1: [] as Measured[], push2: [] as Measured[], read: [] as Measured[], pull: [] as Measured[] };
    let readTeam: Team | undefined;
    for (let run = 1; run <= RUNS; run += 1) {
      // Teams and rows first, outside the timings: every write run gets fresh teams.
      const [rawTeam, pushTeam, teamA, teamB] = [
        await newTeam(`raw ${run}`), await newTeam(`push ${run}`), await newTeam(`push A ${run}`), await newTeam(`push B ${run}`),
      ];
      const rawRows = observations(rawTeam, ROWS);
      const pushOps = observations(pushTeam, ROWS).map(toOp);
      const opsA = observations(teamA, half).map(toOp);
      const opsB = observations(teamB, ROWS - half).map(toOp);

      results.raw.push(await rawUpsert(db, rawTeam, rawRows));
      results.push1.push(await pushAll(pushTeam, pushOps));
      results.push2.push(await pushConcurrently([{ team: teamA, ops: opsA }, { team: teamB, ops: opsB }]));
      readTeam ??= pushTeam;
      console.log(
        `  run ${run}: raw upsert ${int(rate(results.raw.at(-1)!))} rows/s, push 1 client ${int(rate(results.push1.at(-1)!))} ops/s, ` +
          `push 2 clients ${int(rate(results.push2.at(-1)!))} ops/s`,
      );
    }
    // Reads over the first push team (its rows carry what push stored), after the writes settle.
    await db.query('VACUUM ANALYZE observations');
    for (let run = 1; run <= RUNS; run += 1) {
      results.read.push(await rawRead(db, readTeam!));
      results.pull.push(await pullAll(readTeam!));
      console.log(`  read ${run}: raw paged read ${int(rate(results.read.at(-1)!))} rows/s, pull ${int(rate(results.pull.at(-1)!))} rows/s`);
    }

    const lines: [string, Measured[]][] = [
      ['raw upsert (unnest, 500/stmt)', results.raw],
      ['push, 1 client (500 ops/push)', results.push1],
      ['push, 2 clients (2 teams)', results.push2],
      ['raw paged read (1000/page)', results.read],
      ['pull (limit 1000)', results.pull],
    ];
    console.log('');
    console.log(`  ${'measurement'.padEnd(31)}${'rows'.padStart(9)}${'seconds'.padStart(10)}${'rows/s'.padStart(11)}   runs (rows/s)`);
    for (const [label, runs] of lines) {
      const m = median(runs);
      console.log(
        `  ${label.padEnd(31)}${int(m.rows).padStart(9)}${m.seconds.toFixed(3).padStart(10)}${int(rate(m)).padStart(11)}   ${runs.map((r) => int(rate(r))).join(' / ')}`,
      );
    }
    const raw = rate(median(results.raw));
    const read = rate(median(results.read));
    const ratio = (label: string, value: number) => `  ${label.padEnd(44)}${value.toFixed(2)}  (target >= 0.25)`;
    console.log(ratio('ratio push (1 client) / raw upsert:', rate(median(results.push1)) / raw));
    console.log(ratio('ratio push (2 clients) / raw upsert:', rate(median(results.push2)) / raw));
    console.log(ratio('ratio pull / raw paged read:', rate(median(results.pull)) / read));
    if (readTeam) await firstPullInBrowser(readTeam);
  } finally {
    await db.end();
  }
}

/**
 * A first pull into the browser's device store: a new device (fresh browser profile) signs in as
 * the coach of the team holding the pushed observations; the board opens and syncs everything
 * down. Measured from the sign-in tap to the sync line saying "Synced", then the rows are counted
 * on the device.
 */
async function firstPullInBrowser(team: Team) {
  const { chromium } = await import('playwright-core');
  const { execSync } = await import('node:child_process');
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? execSync('command -v chromium', { encoding: 'utf8' }).trim(),
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
    await page.addInitScript('globalThis.__name = (f) => f;');
    await page.goto(`${BASE}/sign-in`);
    await page.evaluate(() => localStorage.setItem('boardside.bench', '1'));
    await page.getByTestId('sign-in-email').fill(team.email);
    await page.getByTestId('sign-in-password').fill('bench-password-123');
    const started = performance.now();
    await page.getByTestId('sign-in-submit').click();
    await page.getByTestId('sync-last').filter({ hasText: /^Synced/ }).waitFor({ timeout: 600_000 });
    const seconds = (performance.now() - started) / 1000;
    const stored = await page.evaluate(async () => {
      const { driver } = (globalThis as any).__boardsideBench;
      const [{ n }] = await driver.all('SELECT count(*) AS n FROM observations');
      return n as number;
    });
    console.log(`\n  first pull into the browser's device store: ${int(stored)} observations in ${seconds.toFixed(1)} s (${int(stored / seconds)} rows/s), sign-in tap to "Synced"`);
  } finally {
    await browser.close();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
