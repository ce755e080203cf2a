/**
 * The convergence proof (shared/SYNC.md "How it is proven" 1) as a scenario both the jest test and
 * bench/convergence.ts run: one team (a head coach with two devices, the other clients invited
 * coaches), N device stores on sql.js running the real engine against the real server, a
 * generated schedule of taps and sync runs, faults injected by seeded RNGs, then faults off and
 * every client syncing until quiet (twice). The result lists what was lost, duplicated,
 * resurrected, and where a device differs from the server; the caller asserts or prints.
 */
import fc from 'fast-check';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { StoreError } from '../../../sync/store';
import { SyncBusy, SyncError } from '../../../sync/errors';
import { TransportError } from '../../../sync/transport';
import type { SyncResult } from '../../../sync/engine';
import { addSkater, inviteAndAccept, signUpCoach, type Account } from '../helpers';
import {
  PROOF_FAULTS,
  deviceState,
  diffTable,
  openDevice,
  randomFaults,
  seededRng,
  serverState,
  sleep,
  type Endpoint,
  type FaultRates,
  type SimDevice,
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
  /** Skew of the clock-skewed quarter of the clients (+ and - alternately). */
  skewMs?: number;
  log?: (line: string) => void;
}

export interface ConvergenceResult {
  clients: number;
  ops: number;
  opsByKind: Record<string, number>;
  /** Ops the store refused because the record had gone meanwhile (e.g. deleted by a pull). */
  skipped: number;
  creates: number;
  deletes: number;
  survivors: number;
  serverLive: number;
  lost: string[];
  duplicated: string[];
  resurrected: string[];
  /** Per device, where it differs from the server after the final syncs. */
  mismatches: string[];
  /** Sync failures not caused by an injected fault (a failed apply, a refused request...). */
  unexpected: string[];
  pendingLeft: number;
  rejectedLeft: number;
  tombstoneRowsLeft: number;
  syncRuns: number;
  syncFailures: number;
  quietRounds: number;
  faults: { requests: number; droppedRequests: number; lateRequests: number; droppedReplies: number; duplicateAnswers: number };
  ms: number;
}

export interface ConvergenceContext {
  app: Express;
  dataSource: DataSource;
  endpoint: Endpoint;
}

const DAYS = ['2026-01-15', '2026-01-16'];

/** A team with a head coach, `coaches` invited coaches and six skaters; cues are the default library. */
export async function makeCoachTeam(app: Express, label: string, coaches: number) {
  const head = await signUpCoach(app, `${label}head`);
  for (let i = 0; i < 6; i += 1) await addSkater(app, head, `Skater ${label} ${i + 1}`);
  const invited: Account[] = [];
  for (let i = 0; i < coaches; i += 1) invited.push(await inviteAndAccept(app, head, 'coach', { label: `${label}c${i}` }));
  return { teamId: head.teamId, head, coaches: invited };
}

interface Client {
  index: number;
  device: SimDevice;
  head: boolean;
  running: Promise<void> | null;
}

export async function runConvergence(ctx: ConvergenceContext, steps: Step[], options: ConvergenceOptions): Promise<ConvergenceResult> {
  const { clients: n, faultSeed } = options;
  const rates = options.rates ?? PROOF_FAULTS;
  const log = options.log ?? (() => undefined);
  const skew = options.skewMs ?? 10 * 60_000;
  const started = Date.now();

  // People: client 0 is the head coach's phone, the last client (with 4+ clients) the head coach's
  // tablet, every other client an invited coach.
  const headDevices = n >= 4 ? 2 : 1;
  const team = await makeCoachTeam(ctx.app, `conv${faultSeed % 100000}`, n - headDevices);
  const { teamId } = team;
  const skewed = Math.max(1, Math.round(n / 4));
  const clients: Client[] = [];
  for (let i = 0; i < n; i += 1) {
    const head = i === 0 || (headDevices === 2 && i === n - 1);
    const account = head ? team.head : team.coaches[i - 1];
    // Every 4th client (a quarter) runs 10 minutes fast or slow.
    const skewIndex = Math.floor(i / 4);
    const skewMs = i % 4 === 1 && skewIndex < skewed ? (skewIndex % 2 === 0 ? skew : -skew) : 0;
    const device = await openDevice(ctx.endpoint, account, {
      label: `client${i}`,
      teamId,
      skewMs,
      policy: randomFaults(seededRng(faultSeed * 31 + i * 7919), rates),
      batchSize: options.batchSize,
      pageSize: options.pageSize,
    });
    clients.push({ index: i, device, head, running: null });
  }
  log(`team ready: ${n} clients (${clients.filter((c) => c.device.skewMs !== 0).length} skewed), ${Date.now() - started} ms`);

  // Signing in loads the team: one clean sync each before the taps start.
  for (const c of clients) {
    c.device.transport.enabled = false;
    await c.device.sync();
    c.device.transport.enabled = true;
  }

  const created = new Map<string, number>();
  const deleted = new Set<string>();
  const opsByKind: Record<string, number> = {};
  let skipped = 0;
  let syncRuns = 0;
  let syncFailures = 0;
  /** Failures that faults do not explain (anything but a lost request or reply): bugs. */
  const unexpected: string[] = [];
  const count = (kind: string) => (opsByKind[kind] = (opsByKind[kind] ?? 0) + 1);

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
          if (error instanceof SyncError && error.step !== 'apply' && error.cause instanceof TransportError) return;
          unexpected.push(`client${c.index}: ${error instanceof Error ? error.message : String(error)}`);
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

  const one = async <T>(db: SimDevice, sql: string, params: (string | number)[], pick: number): Promise<T | undefined> => {
    const [{ n: total }] = await db.driver.all<{ n: number }>(`SELECT count(*) AS n FROM (${sql})`, params);
    if (total === 0) return undefined;
    const [row] = await db.driver.all<T>(`${sql} LIMIT 1 OFFSET ?`, [...params, pick % total]);
    return row;
  };

  for (const [stepIndex, step] of steps.entries()) {
    const c = clients[step.client % n];
    const { device } = c;
    const { store, userId } = device;
    const { pick, action } = step;
    try {
      if (action < 40) {
        // Record: one skater (30%) or a group of 2-3 (10%), on one of two rink days.
        const skaters = (await store.listSkaters(teamId)).map((s) => s.id);
        const cues = (await store.listCues(teamId)).filter((q) => !q.archived);
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
          note: pick % 5 === 0 ? `n${c.index}.${stepIndex}` : '',
          noteShared: (pick & 8) !== 0,
        });
        for (const o of made) created.set(o.id, c.index);
        count(group > 1 ? 'recordGroup' : 'record');
      } else if (action < 72) {
        // Edit the mark (18%), the note (8%) or both (6%) of a note this device shows.
        const row = await one<{ id: string; mark: string }>(
          device,
          `SELECT id, mark FROM observations WHERE team_id = ? AND deleted = 0 ORDER BY id`,
          [teamId],
          pick,
        );
        if (!row) {
          skipped += 1;
        } else {
          const flip = row.mark === 'good' ? 'needs_work' : 'good';
          const patch = action < 58 ? { mark: flip } : action < 66 ? { note: `e${c.index}.${stepIndex}` } : { mark: flip, note: `b${c.index}.${stepIndex}` };
          await store.updateObservation(row.id, userId, patch as { mark?: 'good' | 'needs_work'; note?: string });
          count(action < 58 ? 'editMark' : action < 66 ? 'editNote' : 'editBoth');
        }
      } else if (action < 84) {
        // Delete a note this device shows (12%).
        const row = await one<{ id: string }>(device, `SELECT id FROM observations WHERE team_id = ? AND deleted = 0 ORDER BY id`, [teamId], pick);
        if (!row) skipped += 1;
        else {
          await store.removeObservations([row.id], userId);
          deleted.add(row.id);
          count('delete');
        }
      } else if (action < 90 || !c.head) {
        // Session title or rink (6%; and what a plain coach does instead of cue work).
        const row = await one<{ id: string }>(device, `SELECT id FROM sessions WHERE team_id = ? ORDER BY id`, [teamId], pick);
        if (!row) skipped += 1;
        else {
          await store.updateSession(row.id, userId, pick & 1 ? { title: `t${c.index}.${stepIndex}` } : { rink: `r${c.index}.${stepIndex}` });
          count('editSession');
        }
      } else {
        // Head coach: rename or move a cue (10% of the head coach's devices' steps).
        const cue = await one<{ id: string }>(device, `SELECT id FROM cues WHERE team_id = ? AND archived = 0 ORDER BY phase, sort_order, id`, [teamId], pick);
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

    // Sync runs interleaved with the taps, in the background: this client (22%), a burst of
    // several clients at once (3%), or wait for every run going (2%).
    if (step.sync < 22) kick(c);
    else if (step.sync < 25) for (const other of clients) if ((other.index + step.pick) % 3 === 0) kick(other);
    else if (step.sync < 27) await settle();
    // Let the network and the running syncs move between taps.
    await (pick % 7 === 0 ? sleep(1) : new Promise((resolve) => setImmediate(resolve)));
  }

  // Faults off: wait for what is in flight (late requests included), then sync until quiet, twice.
  await settle();
  for (const c of clients) {
    await c.device.transport.drainGhosts();
    c.device.transport.enabled = false;
  }
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

  // Compare.
  const server = await serverState(ctx.endpoint, team.head.session.accessToken, teamId);
  const sqlRows = (await ctx.dataSource.query(`SELECT id, deleted_at FROM observations WHERE team_id = $1`, [teamId])) as { id: string; deleted_at: Date | null }[];
  const survivors = [...created.keys()].filter((id) => !deleted.has(id));
  const devices = await Promise.all(clients.map((c) => deviceState(c.device.driver, teamId)));

  const lost = new Set<string>();
  for (const id of survivors) {
    if (!server.observations.has(id)) lost.add(`${id} (server)`);
    devices.forEach((d, i) => {
      if (!d.observations.has(id)) lost.add(`${id} (client${i})`);
    });
  }
  const duplicated: string[] = [];
  const seen = new Map<string, number>();
  for (const r of sqlRows) seen.set(r.id, (seen.get(r.id) ?? 0) + 1);
  for (const [id, times] of seen) if (times > 1) duplicated.push(`${id} x${times} rows`);
  const live = sqlRows.filter((r) => r.deleted_at === null);
  for (const r of live) if (!created.has(r.id)) duplicated.push(`${r.id} (live on the server, never created by a client)`);
  if (live.length !== survivors.length) duplicated.push(`server has ${live.length} live observations for ${survivors.length} surviving creates`);
  const resurrected: string[] = [];
  for (const id of deleted) {
    if (server.observations.has(id) || live.some((r) => r.id === id)) resurrected.push(`${id} (server)`);
    devices.forEach((d, i) => {
      if (d.observations.has(id)) resurrected.push(`${id} (client${i})`);
    });
  }
  const mismatches: string[] = [];
  devices.forEach((d, i) => {
    mismatches.push(
      ...[
        ...diffTable('observations', server.observations, d.observations),
        ...diffTable('sessions', server.sessions, d.sessions),
        ...diffTable('cues', server.cues, d.cues),
      ].map((line) => `client${i} ${line}`),
    );
  });

  let pendingLeft = 0;
  let rejectedLeft = 0;
  for (const c of clients) {
    pendingLeft += await c.device.store.pendingCount();
    rejectedLeft += await c.device.store.rejectedCount();
  }
  const stats = clients.map((c) => c.device.transport.stats);
  const sum = (pick: (s: (typeof stats)[number]) => number) => stats.reduce((total, s) => total + pick(s), 0);

  return {
    clients: n,
    ops: Object.values(opsByKind).reduce((a, b) => a + b, 0) + skipped,
    opsByKind,
    skipped,
    creates: created.size,
    deletes: deleted.size,
    survivors: survivors.length,
    serverLive: live.length,
    lost: [...lost],
    duplicated,
    resurrected,
    mismatches,
    unexpected,
    pendingLeft,
    rejectedLeft,
    tombstoneRowsLeft: devices.reduce((total, d) => total + d.tombstones.length, 0),
    syncRuns,
    syncFailures,
    quietRounds,
    faults: {
      requests: sum((s) => s.push + s.pull),
      droppedRequests: sum((s) => s.droppedRequests),
      lateRequests: sum((s) => s.lateRequests),
      droppedReplies: sum((s) => s.droppedReplies),
      duplicateAnswers: sum((s) => s.duplicate),
    },
    ms: Date.now() - started,
  };
}

/** One line per figure, for the test log and the bench. */
export function describeResult(r: ConvergenceResult): string {
  return [
    `clients ${r.clients}, ops ${r.ops} (${Object.entries(r.opsByKind).map(([k, v]) => `${k} ${v}`).join(', ')}, skipped ${r.skipped})`,
    `creates ${r.creates}, deletes ${r.deletes}, surviving ${r.survivors}, live on the server ${r.serverLive}`,
    `lost ${r.lost.length}, duplicated ${r.duplicated.length}, resurrected ${r.resurrected.length}, device/server mismatches ${r.mismatches.length}, unexpected sync failures ${r.unexpected.length}`,
    `outbox left: pending ${r.pendingLeft}, rejected ${r.rejectedLeft}; tombstone rows left ${r.tombstoneRowsLeft}`,
    `sync runs ${r.syncRuns} (${r.syncFailures} failed under faults), final quiet rounds ${r.quietRounds}`,
    `requests ${r.faults.requests}: dropped ${r.faults.droppedRequests}, late ${r.faults.lateRequests}, replies dropped ${r.faults.droppedReplies}, duplicate answers ${r.faults.duplicateAnswers}`,
    `time ${(r.ms / 1000).toFixed(1)} s`,
  ].join('\n');
}
