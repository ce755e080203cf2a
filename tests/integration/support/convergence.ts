/**
 * The convergence proof (shared/SYNC.md "How it is proven" 1) as a scenario both the jest test and
 * bench/convergence.ts run: one team (a head coach with two devices, invited coaches, skaters with
 * their own phones who acknowledge their notes, and a club tablet that a coach and a skater use in
 * turn, signing in and out while syncs run), N device stores on sql.js running the real engine
 * against the real server, a generated schedule of taps and sync runs, faults injected by seeded
 * RNGs, then faults off and every client syncing until quiet (twice).
 *
 * Coaches also time heats on the clock (14% of their steps): start heats, tap crossings, undo the
 * last tap, edit crossings and runs after the race (the head coach's devices edit other coaches'
 * runs: a run timed on one device and edited on another), finish or stop runs, set targets (two
 * coaches setting the same target write one record).
 *
 * The result lists what was lost, duplicated, resurrected (notes, runs and crossings); where a
 * device differs from what the server lets its user see (a skater: only their own notes, a
 * private note's text blank, their own profile and group, their own runs, crossings and targets -
 * computed here from the coach's view, and checked against the server's own pull for the skater); what a skater's device holds that the skater may not see; and sync
 * failures that no injected fault explains. The caller asserts or prints.
 */
import fc from 'fast-check';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import type { Skater } from '../../../shared/schemas';
import { OwnerChanged, StoreError } from '../../../sync/store';
import { SyncBusy, SyncError } from '../../../sync/errors';
import type { SyncResult } from '../../../sync/engine';
import { addSkater, inviteAndAccept, signUpCoach, type Account } from '../helpers';
import {
  InjectedFault,
  PROOF_FAULTS,
  STATE_TABLES,
  deviceState,
  diffTable,
  openDevice,
  randomFaults,
  seededRng,
  serverState,
  skaterLeaks,
  skaterView,
  sleep,
  type Endpoint,
  type FaultRates,
  type SimDevice,
  type SyncedState,
} from './device-client';

/** One scheduled step: client `client` does the action picked by `action` (0-99) with `pick`, then maybe syncs. */
export interface Step {
  client: number;
  action: number;
  pick: number;
  sync: number;
}

export const stepArb = (clients: number): fc.Arbitrary<Step> =>
  fc.record({ client: fc.nat(clients - 1), action: fc.nat(99), pick: fc.nat(), sync: fc.nat(99) });

/** A schedule of exactly clients x opsPerClient steps (each client's share is random, about opsPerClient). */
export const scheduleArb = (clients: number, opsPerClient: number): fc.Arbitrary<Step[]> =>
  fc.array(stepArb(clients), { minLength: clients * opsPerClient, maxLength: clients * opsPerClient });

export interface ConvergenceOptions {
  clients: number;
  faultSeed: number;
  rates?: FaultRates;
  batchSize?: number;
  pageSize?: number;
  /** Share of the shared device's steps after which the other person signs in (percent, default 2). */
  switchPercent?: number;
  /** Skew of the clock-skewed quarter of the clients (+ and - alternately). */
  skewMs?: number;
  log?: (line: string) => void;
}

export interface ConvergenceResult {
  clients: number;
  /** Who each client is: head, coach, skater, or shared (a coach and a skater in turn). */
  roles: string[];
  ops: number;
  opsByKind: Record<string, number>;
  /** Ops the store refused because the record had gone meanwhile (e.g. deleted by a pull). */
  skipped: number;
  creates: number;
  deletes: number;
  survivors: number;
  serverLive: number;
  /** The clock: runs started, crossings tapped, crossings undone, crossings kept (and live on the server). */
  clock: { runs: number; crossings: number; undone: number; kept: number; serverLive: number };
  lost: string[];
  duplicated: string[];
  resurrected: string[];
  /** Per device (and per user of the shared device), where it differs from what the server lets that user see. */
  mismatches: string[];
  /** Where the server's own pull for a skater differs from the contract's view of a skater (computed from the coach's). */
  viewMismatches: string[];
  /** Rows or texts a skater's device holds that the skater may not see. */
  leaks: string[];
  /** Sync failures not caused by an injected fault (a failed apply, a refused request, a 5xx...). */
  unexpected: string[];
  pendingLeft: number;
  rejectedLeft: number;
  /** What the server said about the changes it refused (distinct), to explain rejectedLeft. */
  rejectedReasons: string[];
  /** Outbox rows of anyone left on any device (parked ones of a signed-out user included). */
  outboxRowsLeft: number;
  tombstoneRowsLeft: number;
  syncRuns: number;
  syncFailures: number;
  /** Runs of the shared device stopped because the other person signed in meanwhile. */
  ownerChanges: number;
  /** Sign-ins on the shared device while the steps ran (each one switches its user). */
  switches: number;
  quietRounds: number;
  faults: { requests: number; droppedRequests: number; lateRequests: number; droppedReplies: number; duplicateAnswers: number };
  /** Wall time of each phase (ms). */
  phases: Record<string, number>;
  ms: number;
}

export interface ConvergenceContext {
  app: Express;
  dataSource: DataSource;
  endpoint: Endpoint;
}

const DAYS = ['2026-01-15', '2026-01-16'];

/** The clock's share of a coach's steps: actions CLOCK_FROM..CLOCK_TO-1 (14%). */
const CLOCK_FROM = 72;
const CLOCK_TO = 86;
/** Distances timed (0: free laps, never a target). */
const CLOCK_DISTANCES = [500, 1500, 3000, 0];
/** What a clock step does, from its pick: taps most often, as at the boards. */
function clockKind(pick: number) {
  const kinds = ['startHeat', 'crossing', 'crossing', 'crossing', 'crossing', 'undoCrossing', 'editCrossing', 'finishRun', 'editRun', 'setTarget'] as const;
  return kinds[pick % kinds.length];
}
const GROUPS = ['Group Noord', 'Group Zuid', 'Group Oost'];

/**
 * A team with a head coach, `coaches` invited coaches, six skaters in two groups (a third group
 * stays empty) and `skaterAccounts` of them signed up; cues are the default library. Groups have no
 * route yet: they are written in SQL, numbered by the team counter (its trigger) like any write.
 */
export async function makeCoachTeam(app: Express, dataSource: DataSource, label: string, coaches: number, skaterAccounts = 0) {
  const head = await signUpCoach(app, `${label}head`);
  const skaters: Skater[] = [];
  for (let i = 0; i < 6; i += 1) skaters.push(await addSkater(app, head, `Skater ${label} ${i + 1}`));
  const groupIds = GROUPS.map(() => uuidv7());
  await dataSource.transaction(async (tx) => {
    for (const [i, name] of GROUPS.entries()) {
      await tx.query(`INSERT INTO skater_groups (team_id, id, name, sort_order) VALUES ($1, $2, $3, $4)`, [head.teamId, groupIds[i], name, i]);
    }
    for (const [i, skater] of skaters.entries()) {
      await tx.query(`UPDATE skaters SET group_id = $3 WHERE team_id = $1 AND id = $2`, [head.teamId, skater.id, groupIds[i % 2]]);
    }
  });
  const invited: Account[] = [];
  for (let i = 0; i < coaches; i += 1) invited.push(await inviteAndAccept(app, head, 'coach', { label: `${label}c${i}` }));
  const skaterUsers: { account: Account; skaterId: string; groupId: string }[] = [];
  for (let i = 0; i < skaterAccounts; i += 1) {
    const account = await inviteAndAccept(app, head, 'skater', { skaterId: skaters[i].id, label: `${label}s${i}` });
    skaterUsers.push({ account, skaterId: skaters[i].id, groupId: groupIds[i % 2] });
  }
  return { teamId: head.teamId, head, coaches: invited, skaters, skaterUsers, groupIds };
}

type Role = 'head' | 'coach' | 'skater';

/** Someone who signs in on a device. */
interface Person {
  account: Account;
  role: Role;
  /** For a skater: their profile and group. */
  skaterId?: string;
  groupId?: string;
}

interface Client {
  index: number;
  device: SimDevice;
  /** Who may sign in on it: one person, or two in turn (the shared device). */
  people: Person[];
  /** Who is signed in now. */
  person: Person;
  shared: boolean;
  running: Promise<void> | null;
}

/**
 * Who each client is. Client 0 is the head coach's phone, the last client the head coach's tablet;
 * every 7th client from the 4th is a skater's phone; client 6 is a club tablet shared in turn by a
 * coach and a skater (from 8 clients); the others are coaches' phones.
 */
export function rolesOf(n: number): ('head' | 'coach' | 'skater' | 'shared')[] {
  return Array.from({ length: n }, (_, i) => {
    if (i === 0 || (n >= 4 && i === n - 1)) return 'head';
    if (n >= 8 && i === 6) return 'shared';
    if (n >= 4 && i % 7 === 3) return 'skater';
    return 'coach';
  });
}

export async function runConvergence(ctx: ConvergenceContext, steps: Step[], options: ConvergenceOptions): Promise<ConvergenceResult> {
  const { clients: n, faultSeed } = options;
  const rates = options.rates ?? PROOF_FAULTS;
  const log = options.log ?? (() => undefined);
  const skew = options.skewMs ?? 10 * 60_000;
  const switchPercent = options.switchPercent ?? 2;
  const started = Date.now();
  const phases: Record<string, number> = {};
  let phaseStart = started;
  const phase = (name: string) => {
    const now = Date.now();
    phases[name] = now - phaseStart;
    phaseStart = now;
    log(`${name}: ${phases[name]} ms`);
  };

  const roles = rolesOf(n);
  const coachSeats = roles.filter((r) => r === 'coach' || r === 'shared').length;
  const skaterSeats = roles.filter((r) => r === 'skater' || r === 'shared').length;
  const team = await makeCoachTeam(ctx.app, ctx.dataSource, `conv${faultSeed % 100000}`, coachSeats, skaterSeats);
  const { teamId } = team;
  const coachesLeft = [...team.coaches];
  const skatersLeft = team.skaterUsers.map((s): Person => ({ account: s.account, role: 'skater', skaterId: s.skaterId, groupId: s.groupId }));
  const headPerson: Person = { account: team.head, role: 'head' };
  const skewed = Math.max(1, Math.round(n / 4));
  const clients: Client[] = [];
  for (let i = 0; i < n; i += 1) {
    const people: Person[] =
      roles[i] === 'head'
        ? [headPerson]
        : roles[i] === 'coach'
          ? [{ account: coachesLeft.shift()!, role: 'coach' }]
          : roles[i] === 'skater'
            ? [skatersLeft.shift()!]
            : [{ account: coachesLeft.shift()!, role: 'coach' }, skatersLeft.shift()!];
    // Every 4th client (a quarter) runs 10 minutes fast or slow.
    const skewIndex = Math.floor(i / 4);
    const skewMs = i % 4 === 1 && skewIndex < skewed ? (skewIndex % 2 === 0 ? skew : -skew) : 0;
    const device = await openDevice(ctx.endpoint, people[0].account, {
      label: `client${i}`,
      teamId,
      skewMs,
      policy: randomFaults(seededRng(faultSeed * 31 + i * 7919), rates),
      batchSize: options.batchSize,
      pageSize: options.pageSize,
    });
    clients.push({ index: i, device, people, person: people[0], shared: people.length > 1, running: null });
  }
  phase('team');

  // Signing in loads the team: one clean sync each before the taps start.
  for (const c of clients) {
    c.device.transport.enabled = false;
    await c.device.sync();
    c.device.transport.enabled = true;
  }
  phase('first sync');

  const created = new Map<string, number>();
  const deleted = new Set<string>();
  const createdRuns = new Map<string, number>();
  const createdCrossings = new Map<string, number>();
  const deletedCrossings = new Set<string>();
  const opsByKind: Record<string, number> = {};
  let skipped = 0;
  let syncRuns = 0;
  let syncFailures = 0;
  let ownerChanges = 0;
  let switches = 0;
  /** Failures that faults do not explain (anything but an injected fault): bugs. */
  const unexpected: string[] = [];
  const count = (kind: string) => (opsByKind[kind] = (opsByKind[kind] ?? 0) + 1);
  const describe = (error: unknown) => {
    const cause = error instanceof SyncError ? error.cause : undefined;
    const text = (e: unknown) => (e instanceof Error ? `${e.name}: ${e.message}` : String(e));
    return `${text(error)}${cause ? ` (cause ${text(cause)})` : ''}`;
  };

  const kick = (c: Client) => {
    if (c.running) return;
    syncRuns += 1;
    c.running = c.device
      .sync()
      .then(
        () => undefined,
        (error) => {
          syncFailures += 1;
          if (error instanceof SyncBusy) return;
          const cause = error instanceof SyncError ? error.cause : error;
          if (error instanceof SyncError && error.step !== 'apply' && cause instanceof InjectedFault) return;
          // The other person signed in on the shared device while this run went: it stops.
          if (c.shared && (cause instanceof OwnerChanged || error instanceof OwnerChanged)) {
            ownerChanges += 1;
            return;
          }
          unexpected.push(`client${c.index}: ${describe(error)}`);
        },
      )
      .finally(() => {
        c.running = null;
      });
  };
  const settle = async () => {
    for (;;) {
      const running = clients.map((c) => c.running).filter(Boolean);
      if (running.length === 0) return;
      await Promise.all(running);
    }
  };

  /**
   * One row of `table` matching `where`, picked by `pick`: the first at or after a rowid chosen
   * from `pick` (wrapping to the first). An index seek, not a count and a sorted scan per tap: with
   * thousands of notes on each of 20 devices those scans were a tenth of the proof's time.
   */
  const one = async <T>(db: SimDevice, columns: string, table: string, where: string, params: (string | number)[], pick: number): Promise<T | undefined> => {
    const [{ top }] = await db.driver.all<{ top: number | null }>(`SELECT max(rowid) AS top FROM ${table}`);
    if (top === null) return undefined;
    const sql = `SELECT ${columns} FROM ${table} WHERE ${where} AND rowid >= ? ORDER BY rowid LIMIT 1`;
    const [row] = await db.driver.all<T>(sql, [...params, pick % (top + 1)]);
    return row ?? (await db.driver.all<T>(sql, [...params, 0]))[0];
  };

  for (const [stepIndex, step] of steps.entries()) {
    const c = clients[step.client % n];
    const { device, person } = c;
    const { store, userId } = device;
    const { pick, action } = step;
    try {
      if (person.role === 'skater') {
        // A skater acknowledges one of their notes (60%) or reads their page (notes, or runs).
        const row = action < 60 ? await one<{ id: string }>(device, 'id', 'observations', 'team_id = ? AND deleted = 0 AND acknowledged_at IS NULL', [teamId], pick) : undefined;
        if (row) {
          await store.acknowledgeObservation(row.id, userId, 'skater');
          count('acknowledge');
        } else if (action >= 80) {
          await store.runsForSkater(teamId, person.skaterId!, DAYS[pick % DAYS.length]);
          count('readRuns');
        } else {
          await store.listForSkater(teamId, person.skaterId!, DAYS[pick % DAYS.length]);
          count('read');
        }
      } else if (action >= CLOCK_FROM && action < CLOCK_TO) {
        // The clock (14%): heats, taps, undo, edits after the race, finishing, targets.
        const role = person.role === 'head' ? 'head_coach' : 'coach';
        const kind = clockKind(pick);
        const ownRunning = () =>
          one<{ id: string }>(device, 'id', 'runs', 'team_id = ? AND deleted = 0 AND status = ? AND created_by = ?', [teamId, 'running', userId], pick >>> 4);
        const running = kind === 'crossing' || kind === 'undoCrossing' ? await ownRunning() : undefined;
        if (kind === 'startHeat' || (kind === 'crossing' && !running)) {
          const skaters = (await store.listSkaters(teamId)).map((s) => s.id);
          if (skaters.length < 2) throw new StoreError('nothing loaded yet');
          const distanceM = CLOCK_DISTANCES[(pick >>> 4) % CLOCK_DISTANCES.length];
          const first = (pick >>> 6) % skaters.length;
          const made = await store.startHeat({
            teamId,
            userId,
            heatId: uuidv7(),
            startedAt: new Date(device.skewMs + Date.now()).toISOString(),
            day: DAYS[(pick >>> 5) % DAYS.length],
            runs: [
              { skaterId: skaters[first], distanceM, track: 'long', lane: 'inner' },
              ...(pick & 8 ? [{ skaterId: skaters[(first + 1) % skaters.length], distanceM, track: 'long' as const, lane: 'outer' as const }] : []),
            ],
          });
          for (const r of made) createdRuns.set(r.id, c.index);
          count('startHeat');
        } else if (kind === 'crossing') {
          const [{ last }] = await device.driver.all<{ last: number | null }>(`SELECT max(at_ms) AS last FROM crossings WHERE run_id = ? AND deleted = 0`, [running!.id]);
          const atMs = Math.min(86_400_000, (last ?? 0) + 20_000 + ((pick >>> 3) % 15_000));
          const made = await store.recordCrossing({ runId: running!.id, userId, atMs, role, handTimed: (pick & 64) !== 0 });
          createdCrossings.set(made.id, c.index);
          count('crossing');
        } else if (kind === 'undoCrossing') {
          // Undo the last tap of one of this coach's runs (running, or just finished).
          const run = running ?? (await one<{ id: string }>(device, 'id', 'runs', 'team_id = ? AND deleted = 0 AND created_by = ?', [teamId, userId], pick >>> 4));
          const [last] = run
            ? await device.driver.all<{ id: string }>(`SELECT id FROM crossings WHERE run_id = ? AND deleted = 0 ORDER BY at_ms DESC LIMIT 1`, [run.id])
            : [];
          if (!last) skipped += 1;
          else {
            await store.removeCrossings([last.id], userId, role);
            deletedCrossings.add(last.id);
            count('undoCrossing');
          }
        } else if (kind === 'editCrossing') {
          // After the race: move a crossing or mark it hand-timed (a plain coach's edit of another's run is refused: skipped).
          const row = await one<{ id: string; at_ms: number; hand_timed: number }>(device, 'id, at_ms, hand_timed', 'crossings', 'team_id = ? AND deleted = 0', [teamId], pick);
          if (!row) skipped += 1;
          else {
            await store.updateCrossing(row.id, userId, pick & 2 ? { handTimed: !row.hand_timed } : { atMs: Math.max(0, row.at_ms - 1 - ((pick >>> 2) % 90)) }, role);
            count('editCrossing');
          }
        } else if (kind === 'finishRun' || kind === 'editRun') {
          const row = await one<{ id: string; status: string }>(device, 'id, status', 'runs', 'team_id = ? AND deleted = 0', [teamId], pick);
          if (!row) skipped += 1;
          else if (kind === 'finishRun') {
            await store.finishRun(row.id, userId, pick & 2 ? { status: 'finished' } : { status: 'stopped', stopReason: `[s${c.index}.${stepIndex}]` }, role);
            count('finishRun');
          } else {
            await store.updateRun(row.id, userId, { note: `[r${c.index}.${stepIndex}]` }, role);
            count('editRun');
          }
        } else {
          // A target: every coach may set any skater's (one record per skater, track and distance).
          const skaters = (await store.listSkaters(teamId)).map((s) => s.id);
          if (skaters.length === 0) throw new StoreError('nothing loaded yet');
          const distanceM = CLOCK_DISTANCES[(pick >>> 4) % (CLOCK_DISTANCES.length - 1)];
          const plan = distanceM === 1500 && pick & 2 ? { plan: 'shares' as const, sharesPct: [22.1, 24.6, 26.2, 27.1], openerMs: null } : { plan: 'even' as const, openerMs: pick & 4 ? 20_000 + (pick % 9_000) : null, sharesPct: null };
          await store.setTarget({ teamId, userId, role, skaterId: skaters[(pick >>> 7) % skaters.length], track: 'long', distanceM, targetMs: 100_000 + ((pick >>> 3) % 30_000) * 10, ...plan });
          count('setTarget');
        }
      } else if (action < 36) {
        // Record: one skater (30%) or a group of 2-3 (6%), on one of two rink days.
        const skaters = (await store.listSkaters(teamId)).map((s) => s.id);
        const cues = (await store.listCues(teamId)).filter((q) => !q.archived);
        // Right after a sign-in on the shared device the board is empty until the first pull.
        if (skaters.length === 0 || cues.length === 0) throw new StoreError('nothing loaded yet');
        const group = action >= 30 ? 2 + (pick % 2) : 1;
        const chosen = [...new Set(Array.from({ length: group }, (_, k) => skaters[(pick + k * 5) % skaters.length]))];
        const session = await store.startSession(teamId, userId, DAYS[pick % DAYS.length]);
        const made = await store.recordObservations({
          teamId,
          userId,
          sessionId: session.id,
          skaterIds: chosen,
          cueId: cues[(pick >>> 3) % cues.length].id,
          mark: pick & 4 ? 'good' : 'needs_work',
          // Note texts in brackets: distinct, so a search for one never finds another.
          note: pick % 5 === 0 ? `[n${c.index}.${stepIndex}]` : '',
          noteShared: (pick & 8) !== 0,
        });
        for (const o of made) created.set(o.id, c.index);
        count(group > 1 ? 'recordGroup' : 'record');
      } else if (action < 62) {
        // Edit the mark (13%), the note (5%), who sees the note (3%) or mark and note (2%) of a note
        // this device shows, or move it to another skater and cue (3%: the evening's tidy-up).
        const row = await one<{ id: string; mark: string; note_shared: number; skater_id: string }>(device, 'id, mark, note_shared, skater_id', 'observations', 'team_id = ? AND deleted = 0', [teamId], pick);
        if (!row) {
          skipped += 1;
        } else if (action >= 59) {
          const skaters = (await store.listSkaters(teamId)).map((s) => s.id).filter((id) => id !== row.skater_id);
          const cues = (await store.listCues(teamId)).filter((q) => !q.archived);
          if (skaters.length === 0 || cues.length === 0) throw new StoreError('nothing loaded yet');
          await store.fixNote(
            row.id,
            userId,
            { skaterId: skaters[(pick >>> 3) % skaters.length], ...(pick & 2 ? { cueId: cues[(pick >>> 5) % cues.length].id } : {}) },
            person.role === 'head' ? 'head_coach' : 'coach',
          );
          count('moveNote');
        } else {
          const flip = row.mark === 'good' ? 'needs_work' : 'good';
          const kind = action < 49 ? 'editMark' : action < 54 ? 'editNote' : action < 57 ? 'editShared' : 'editBoth';
          const patch =
            kind === 'editMark'
              ? { mark: flip }
              : kind === 'editNote'
                ? { note: `[e${c.index}.${stepIndex}]` }
                : kind === 'editShared'
                  ? { noteShared: !row.note_shared }
                  : { mark: flip, note: `[b${c.index}.${stepIndex}]` };
          // A plain coach's edit of someone else's note is refused by the store (StoreError: skipped).
          await store.updateObservation(row.id, userId, patch as { mark?: 'good' | 'needs_work'; note?: string; noteShared?: boolean }, person.role === 'head' ? 'head_coach' : 'coach');
          count(kind);
        }
      } else if (action < 72) {
        // Delete a note this device shows (10%).
        const row = await one<{ id: string }>(device, 'id', 'observations', 'team_id = ? AND deleted = 0', [teamId], pick);
        if (!row) skipped += 1;
        else {
          await store.removeObservations([row.id], userId, person.role === 'head' ? 'head_coach' : 'coach');
          deleted.add(row.id);
          count('delete');
        }
      } else if (action < 90 || person.role !== 'head') {
        // Session title or rink (6%; and what a plain coach does instead of cue work).
        const row = await one<{ id: string }>(device, 'id', 'sessions', 'team_id = ?', [teamId], pick);
        if (!row) skipped += 1;
        else {
          await store.updateSession(row.id, userId, pick & 1 ? { title: `t${c.index}.${stepIndex}` } : { rink: `r${c.index}.${stepIndex}` });
          count('editSession');
        }
      } else {
        // Head coach: rename or move a cue (10% of the head coach's devices' steps).
        const cue = await one<{ id: string }>(device, 'id', 'cues', 'team_id = ? AND archived = 0', [teamId], pick);
        if (!cue) skipped += 1;
        else if (pick & 1) {
          await store.renameCue(cue.id, userId, `Cue ${c.index}.${stepIndex}`);
          count('renameCue');
        } else {
          await store.moveCue(cue.id, userId, pick & 2 ? 'up' : 'down');
          count('moveCue');
        }
      }
    } catch (error) {
      // A pull that landed meanwhile may have removed the record: the coach's tap finds nothing.
      if (!(error instanceof StoreError)) throw error;
      skipped += 1;
    }

    // The shared device changes hands now and then (2% of its steps by default), even while a sync runs.
    if (c.shared && step.sync >= 100 - switchPercent) {
      const next = c.people[(c.people.indexOf(c.person) + 1) % c.people.length];
      await device.signIn(next.account);
      c.person = next;
      switches += 1;
      // Opening the board syncs (the run going for the previous person stops at its next step).
      kick(c);
    }

    // Sync runs interleaved with the taps, in the background: this client (22%), a burst of
    // several clients at once (3%), or wait for every run going (2%).
    if (step.sync < 22) kick(c);
    else if (step.sync < 25) for (const other of clients) if ((other.index + step.pick) % 3 === 0) kick(other);
    else if (step.sync < 27) await settle();
    // Let the network and the running syncs move between taps.
    await (pick % 7 === 0 ? sleep(1) : new Promise((resolve) => setImmediate(resolve)));
  }
  phase('steps');

  // Faults off: wait for what is in flight (late requests included).
  await settle();
  for (const c of clients) {
    await c.device.transport.drainGhosts();
    c.device.transport.enabled = false;
  }
  // Each person of the shared device sends what waits for them (parked while the other used it).
  const signInAndSync = async (c: Client, person: Person) => {
    if (c.person !== person) {
      await c.device.signIn(person.account);
      c.person = person;
    }
    await c.device.sync();
    syncRuns += 1;
  };
  for (const c of clients) if (c.shared) for (const person of c.people) await signInAndSync(c, person);
  // Then every client syncs until quiet, twice.
  let quietRounds = 0;
  for (let time = 0; time < 2; time += 1) {
    for (let round = 0; ; round += 1) {
      if (round > 12) throw new Error('the clients never went quiet');
      let busy = false;
      for (const c of clients) {
        const result: SyncResult = await c.device.sync();
        syncRuns += 1;
        if (result.push.sent > 0 || result.pull.changes + result.pull.tombstones + result.pull.evictions > 0) busy = true;
      }
      quietRounds += 1;
      if (!busy) break;
    }
  }
  phase('final syncs');

  // Compare. What each person may see, by the contract, from the head coach's pull.
  const coachView = await serverState(ctx.endpoint, team.head.session.accessToken, teamId);
  const sqlRows = (await ctx.dataSource.query(`SELECT id, deleted_at, note, note_shared FROM observations WHERE team_id = $1`, [teamId])) as {
    id: string;
    deleted_at: Date | null;
    note: string;
    note_shared: boolean;
  }[];
  const privateTexts = [...new Set(sqlRows.filter((r) => !r.note_shared && r.note !== '').map((r) => r.note))];
  const survivors = [...created.keys()].filter((id) => !deleted.has(id));
  const crossingSurvivors = [...createdCrossings.keys()].filter((id) => !deletedCrossings.has(id));
  const crossingRows = (await ctx.dataSource.query(`SELECT id, deleted_at FROM crossings WHERE team_id = $1`, [teamId])) as { id: string; deleted_at: Date | null }[];
  const runRows = (await ctx.dataSource.query(`SELECT id, deleted_at FROM runs WHERE team_id = $1`, [teamId])) as { id: string; deleted_at: Date | null }[];
  const viewFor = (person: Person): SyncedState => (person.role === 'skater' ? skaterView(coachView, person.skaterId!) : coachView);

  const lost = new Set<string>();
  const resurrected: string[] = [];
  const mismatches: string[] = [];
  const viewMismatches: string[] = [];
  const leaks: string[] = [];
  let tombstoneRowsLeft = 0;
  for (const id of survivors) if (!coachView.observations.has(id)) lost.add(`${id} (server)`);
  for (const id of deleted) if (coachView.observations.has(id) || sqlRows.some((r) => r.id === id && r.deleted_at === null)) resurrected.push(`${id} (server)`);
  // The clock: every run made is live on the server (runs are not deleted here), every crossing
  // tapped and not undone is, and no undone one is.
  for (const id of createdRuns.keys()) if (!coachView.runs.has(id)) lost.add(`run ${id} (server)`);
  for (const id of crossingSurvivors) if (!coachView.crossings.has(id)) lost.add(`crossing ${id} (server)`);
  for (const id of deletedCrossings) if (coachView.crossings.has(id) || crossingRows.some((r) => r.id === id && r.deleted_at === null)) resurrected.push(`crossing ${id} (server)`);

  /** Checks one device as the person signed in on it now. */
  const check = async (c: Client, label: string) => {
    const want = viewFor(c.person);
    const got = await deviceState(c.device.driver, teamId);
    tombstoneRowsLeft += got.tombstones.length;
    for (const id of survivors) if (want.observations.has(id) && !got.observations.has(id)) lost.add(`${id} (${label})`);
    for (const id of deleted) if (got.observations.has(id)) resurrected.push(`${id} (${label})`);
    for (const id of crossingSurvivors) if (want.crossings.has(id) && !got.crossings.has(id)) lost.add(`crossing ${id} (${label})`);
    for (const id of deletedCrossings) if (got.crossings.has(id)) resurrected.push(`crossing ${id} (${label})`);
    for (const table of STATE_TABLES) mismatches.push(...diffTable(table, want[table], got[table]).map((line) => `${label} ${line}`));
    if (c.person.role === 'skater') {
      const readable = new Set([...want.observations.values()].map((o) => o.note as string));
      const secrets = privateTexts.filter((text) => !readable.has(text));
      leaks.push(...(await skaterLeaks(c.device.driver, c.person.skaterId!, c.person.groupId ?? null, secrets)).map((line) => `${label}: ${line}`));
    }
  };
  for (const c of clients) await check(c, `client${c.index} (${c.person.role})`);
  // The shared device once more for each person, the skater last (right after the coach used it).
  for (const c of clients) {
    if (!c.shared) continue;
    const order = [...c.people].sort((a, b) => (a.role === 'skater' ? 1 : 0) - (b.role === 'skater' ? 1 : 0));
    for (const person of order) {
      await signInAndSync(c, person);
      await check(c, `client${c.index} (shared, ${person.role} again)`);
    }
  }
  // The server's own filter for every skater account agrees with the contract's view.
  const skaterPeople = clients.flatMap((c) => c.people).filter((p) => p.role === 'skater');
  for (const person of skaterPeople) {
    const pulled = await serverState(ctx.endpoint, person.account.session.accessToken, teamId);
    const want = skaterView(coachView, person.skaterId!);
    for (const table of STATE_TABLES) viewMismatches.push(...diffTable(table, want[table], pulled[table]).map((line) => `skater ${person.skaterId} pull: ${line}`));
  }

  const duplicated: string[] = [];
  const seen = new Map<string, number>();
  for (const r of sqlRows) seen.set(r.id, (seen.get(r.id) ?? 0) + 1);
  for (const [id, times] of seen) if (times > 1) duplicated.push(`${id} x${times} rows`);
  const live = sqlRows.filter((r) => r.deleted_at === null);
  for (const r of live) if (!created.has(r.id)) duplicated.push(`${r.id} (live on the server, never created by a client)`);
  if (live.length !== survivors.length) duplicated.push(`server has ${live.length} live observations for ${survivors.length} surviving creates`);
  for (const [rowsOf, made, what] of [
    [crossingRows, createdCrossings, 'crossing'],
    [runRows, createdRuns, 'run'],
  ] as const) {
    const counted = new Map<string, number>();
    for (const r of rowsOf) counted.set(r.id, (counted.get(r.id) ?? 0) + 1);
    for (const [id, times] of counted) if (times > 1) duplicated.push(`${what} ${id} x${times} rows`);
    for (const r of rowsOf) if (r.deleted_at === null && !made.has(r.id)) duplicated.push(`${what} ${r.id} (live on the server, never made by a client)`);
  }
  const liveCrossings = crossingRows.filter((r) => r.deleted_at === null).length;
  if (liveCrossings !== crossingSurvivors.length) duplicated.push(`server has ${liveCrossings} live crossings for ${crossingSurvivors.length} kept taps`);

  let pendingLeft = 0;
  let rejectedLeft = 0;
  let outboxRowsLeft = 0;
  const rejectedReasons = new Set<string>();
  for (const c of clients) {
    pendingLeft += await c.device.store.pendingCount();
    rejectedLeft += await c.device.store.rejectedCount();
    for (const entry of await c.device.store.listRejected()) rejectedReasons.add(`${entry.table} ${entry.kind}: ${entry.rejectReason} ${entry.lastError ?? ''}`.trim());
    outboxRowsLeft += (await c.device.driver.all<{ n: number }>(`SELECT count(*) AS n FROM outbox`))[0].n;
  }
  const stats = clients.map((c) => c.device.transport.stats);
  const sum = (pick: (s: (typeof stats)[number]) => number) => stats.reduce((total, s) => total + pick(s), 0);
  phase('compare');

  return {
    clients: n,
    roles,
    ops: Object.values(opsByKind).reduce((a, b) => a + b, 0) + skipped,
    opsByKind,
    skipped,
    creates: created.size,
    deletes: deleted.size,
    survivors: survivors.length,
    serverLive: live.length,
    clock: { runs: createdRuns.size, crossings: createdCrossings.size, undone: deletedCrossings.size, kept: crossingSurvivors.length, serverLive: liveCrossings },
    lost: [...lost],
    duplicated,
    resurrected,
    mismatches,
    viewMismatches,
    leaks,
    unexpected,
    pendingLeft,
    rejectedLeft,
    rejectedReasons: [...rejectedReasons],
    outboxRowsLeft,
    tombstoneRowsLeft,
    syncRuns,
    syncFailures,
    ownerChanges,
    switches,
    quietRounds,
    faults: {
      requests: sum((s) => s.push + s.pull),
      droppedRequests: sum((s) => s.droppedRequests),
      lateRequests: sum((s) => s.lateRequests),
      droppedReplies: sum((s) => s.droppedReplies),
      duplicateAnswers: sum((s) => s.duplicate),
    },
    phases,
    ms: Date.now() - started,
  };
}

/** One line per figure, for the test log and the bench. */
export function describeResult(r: ConvergenceResult): string {
  const seats = r.roles.reduce<Record<string, number>>((acc, role) => ({ ...acc, [role]: (acc[role] ?? 0) + 1 }), {});
  return [
    `clients ${r.clients} (${Object.entries(seats).map(([k, v]) => `${k} ${v}`).join(', ')}), ops ${r.ops} (${Object.entries(r.opsByKind).map(([k, v]) => `${k} ${v}`).join(', ')}, skipped ${r.skipped})`,
    `creates ${r.creates}, deletes ${r.deletes}, surviving ${r.survivors}, live on the server ${r.serverLive}`,
    `clock: runs ${r.clock.runs}, crossings ${r.clock.crossings} (undone ${r.clock.undone}, kept ${r.clock.kept}, live on the server ${r.clock.serverLive})`,
    `lost ${r.lost.length}, duplicated ${r.duplicated.length}, resurrected ${r.resurrected.length}, device/server mismatches ${r.mismatches.length}, skater view mismatches ${r.viewMismatches.length}, leaks ${r.leaks.length}, unexpected sync failures ${r.unexpected.length}`,
    `outbox left: pending ${r.pendingLeft}, rejected ${r.rejectedLeft}, rows ${r.outboxRowsLeft}; tombstone rows left ${r.tombstoneRowsLeft}`,
    ...r.rejectedReasons.slice(0, 5).map((reason) => `  refused: ${reason}`),
    `sync runs ${r.syncRuns} (${r.syncFailures} failed under faults, ${r.ownerChanges} stopped by a sign-in), shared device sign-ins ${r.switches}, final quiet rounds ${r.quietRounds}`,
    `requests ${r.faults.requests}: dropped ${r.faults.droppedRequests}, late ${r.faults.lateRequests}, replies dropped ${r.faults.droppedReplies}, duplicate answers ${r.faults.duplicateAnswers}`,
    `time ${(r.ms / 1000).toFixed(1)} s (${Object.entries(r.phases).map(([k, v]) => `${k} ${(v / 1000).toFixed(1)} s`).join(', ')})`,
  ].join('\n');
}
