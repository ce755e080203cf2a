/**
 * Real device stores (DeviceStore on sql.js) running the real sync engine against the real server
 * over HTTP, through a transport that can misbehave on purpose:
 *
 * - drop a request: throw TransportError before anything is sent (the server never sees it);
 * - deliver late: throw TransportError at once (the device gives up, as on a timeout) but send
 *   the request anyway a little later, so it reaches the server after newer ones ("ghost");
 * - drop a reply: send, let the server commit, then throw TransportError instead of answering;
 * - delay both legs by a random few milliseconds, which reorders requests and replies of clients
 *   syncing at the same time.
 *
 * Every decision comes from a seeded RNG (or a test's own policy), never from Math.random.
 * Used by tests/integration/sync-convergence.test.ts and bench/convergence.ts.
 */
import http from 'node:http';
import { v5 as uuidv5 } from 'uuid';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import { pullReplySchema, pushReplySchema, type PullReply, type PushBody, type PushReply } from '../../../shared/schemas/sync';
import type { SqlDriver, SqlValue } from '../../../sync/driver';
import { decodeRow, selectColumns } from '../../../sync/fields';
import { synchronize, type SyncResult } from '../../../sync/engine';
import { DeviceStore } from '../../../sync/store';
import { RequestRefused, ResyncRequired, ServerUnavailable, TransportError, type PullQuery, type SyncTransport } from '../../../sync/transport';
import { openMemoryDriver } from '../../unit/support/sqljs-driver';

// ---- the server on a real port ----------------------------------------------------------------

export interface Endpoint {
  base: string;
  close(): Promise<void>;
}

/** Listens on an ephemeral port of 127.0.0.1 (fetch then goes through real HTTP). */
export async function listen(app: Express): Promise<Endpoint> {
  const server = http.createServer(app);
  // The server never closes an idle kept-alive connection itself (the clients' pool does, after
  // its own few seconds). With Node's default 5 s, a loaded machine (the 20 devices' SQLite work
  // delays every timer) sometimes had the server close a socket just as fetch reused it: a
  // request failed with ECONNRESET that no injected fault explains.
  server.keepAliveTimeout = 0;
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    base: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.closeAllConnections();
        server.close((error) => (error ? reject(error) : resolve()));
      }),
  };
}

// ---- deterministic randomness -----------------------------------------------------------------

/** mulberry32: a small seeded PRNG, [0, 1). */
export function seededRng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

// ---- the transport ----------------------------------------------------------------------------

export type CallKind = 'push' | 'pull';

/** What to do with one call. */
export interface Fault {
  /** Throw before sending. */
  dropRequest?: boolean;
  /** Throw at once, but send the request after `lateMs` anyway (it lands after newer ones). */
  late?: boolean;
  lateMs?: number;
  /** Send it, let the server answer (and commit), then throw instead of answering. */
  dropReply?: boolean;
  /** Wait before sending. */
  delayMs?: number;
  /** Wait before handing the reply over. */
  replyDelayMs?: number;
}

/** `index` counts this transport's calls of that kind, from 0. */
export type FaultPolicy = (call: { kind: CallKind; index: number }) => Fault;

export const noFaults: FaultPolicy = () => ({});

export interface FaultRates {
  /** Share of requests lost before reaching the server (a quarter of them arrive late instead). */
  dropRequest: number;
  /** Share of the delivered requests whose reply is lost after the server committed. */
  dropReply: number;
  maxDelayMs: number;
}

export const PROOF_FAULTS: FaultRates = { dropRequest: 0.2, dropReply: 0.1, maxDelayMs: 6 };

/** Random faults at the given rates from a seeded RNG. */
export function randomFaults(rng: () => number, rates: FaultRates): FaultPolicy {
  return () => {
    const fault: Fault = { delayMs: Math.floor(rng() * (rates.maxDelayMs + 1)), replyDelayMs: Math.floor(rng() * (rates.maxDelayMs + 1)) };
    if (rng() < rates.dropRequest) {
      if (rng() < 0.25) {
        fault.late = true;
        fault.lateMs = 1 + Math.floor(rng() * 4 * (rates.maxDelayMs + 1));
      } else fault.dropRequest = true;
    } else if (rng() < rates.dropReply) fault.dropReply = true;
    return fault;
  };
}

export interface TransportStats {
  push: number;
  pull: number;
  droppedRequests: number;
  lateRequests: number;
  droppedReplies: number;
  /** Push results by status, for the replies the device got. */
  applied: number;
  duplicate: number;
  rejected: number;
}

export interface CallRecord {
  kind: CallKind;
  index: number;
  /** The push body or pull query sent (absent when the request was dropped). */
  sent?: PushBody | PullQuery;
  status?: number;
  reply?: PushReply | PullReply;
  fault: Fault;
}

/** A failure this transport made up on purpose (anything else a run meets is real). */
export class InjectedFault extends TransportError {}

export class FaultyTransport implements SyncTransport {
  policy: FaultPolicy;
  /** Off: every call goes straight through, no delay. */
  enabled = true;
  readonly stats: TransportStats = { push: 0, pull: 0, droppedRequests: 0, lateRequests: 0, droppedReplies: 0, applied: 0, duplicate: 0, rejected: 0 };
  /** Requests delivered late, still in flight or done. */
  readonly ghosts: Promise<unknown>[] = [];
  /** Every call, when `record` is on. */
  readonly calls: CallRecord[] = [];
  record = false;
  private readonly counts: Record<CallKind, number> = { push: 0, pull: 0 };

  constructor(
    private readonly base: string,
    private readonly token: () => string,
    policy: FaultPolicy = noFaults,
  ) {
    this.policy = policy;
  }

  push(body: PushBody): Promise<PushReply> {
    return this.call('push', body, (token) =>
      this.http('/api/sync/push', token, { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }),
    ).then((reply) => {
      const parsed = pushReplySchema.parse(reply);
      for (const r of parsed.results) this.stats[r.status] += 1;
      return parsed;
    });
  }

  pull(q: PullQuery): Promise<PullReply> {
    const query = new URLSearchParams({ teamId: q.teamId, cursor: String(q.cursor), limit: String(q.limit) });
    return this.call('pull', q, (token) => this.http(`/api/sync/pull?${query.toString()}`, token, { method: 'GET' })).then((reply) => pullReplySchema.parse(reply));
  }

  /** The server's time, asked straight (no faults): lets a device with a wrong clock correct it. */
  async time(): Promise<string> {
    const response = await fetch(`${this.base}/api/health`);
    return ((await response.json()) as { serverTime: string }).serverTime;
  }

  /** Waits for every late request to have reached the server. */
  async drainGhosts(): Promise<void> {
    while (this.ghosts.length > 0) await Promise.allSettled(this.ghosts.splice(0));
  }

  private async call(kind: CallKind, sent: PushBody | PullQuery, send: (token: string) => Promise<{ status: number; body: unknown }>): Promise<unknown> {
    // The token of whoever is signed in when the call starts: a late request still speaks for the
    // user whose run sent it, even if someone else signed in on the device meanwhile.
    const token = this.token();
    const index = this.counts[kind]++;
    this.stats[kind] += 1;
    const fault = this.enabled ? this.policy({ kind, index }) : {};
    const entry: CallRecord = { kind, index, fault };
    if (this.record) this.calls.push(entry);
    if (fault.delayMs) await sleep(fault.delayMs);
    if (fault.dropRequest) {
      this.stats.droppedRequests += 1;
      throw new InjectedFault(`${kind} request lost (injected)`);
    }
    if (fault.late) {
      this.stats.lateRequests += 1;
      const ghost = sleep(fault.lateMs ?? 5).then(() => send(token));
      // Nobody waits for a late request's answer but drainGhosts; a failed one must not crash the run.
      ghost.catch(() => undefined);
      this.ghosts.push(ghost);
      throw new InjectedFault(`${kind} timed out (injected; the request arrives later)`);
    }
    entry.sent = sent;
    const { status, body } = await send(token);
    entry.status = status;
    if (status !== 200) throw toSyncError(status, body);
    entry.reply = body as PushReply | PullReply;
    if (fault.replyDelayMs) await sleep(fault.replyDelayMs);
    if (fault.dropReply) {
      this.stats.droppedReplies += 1;
      throw new InjectedFault(`${kind} reply lost after the server answered (injected)`);
    }
    return body;
  }

  private async http(path: string, token: string, init: RequestInit): Promise<{ status: number; body: unknown }> {
    const res = await fetch(`${this.base}${path}`, { ...init, headers: { ...(init.headers as Record<string, string>), authorization: `Bearer ${token}` } });
    const text = await res.text();
    let body: unknown = null;
    try {
      body = text ? JSON.parse(text) : null;
    } catch {
      body = { error: { message: text } };
    }
    return { status: res.status, body };
  }
}

/** The same mapping the app's HTTP transport makes (store/sync-transport.ts). */
function toSyncError(status: number, body: unknown): Error {
  const error = (body as { error?: { code?: string; message?: string } } | null)?.error ?? {};
  const message = error.message ?? `HTTP ${status}`;
  if (status === 410 || error.code === 'resync_required') return new ResyncRequired();
  if (status >= 500) return new ServerUnavailable(status === 503 ? undefined : message, status);
  if (status === 400 || status === 413 || status === 422) return new RequestRefused(message, status, error.code ?? 'validation');
  return new TransportError(message, status);
}

// ---- a simulated device ------------------------------------------------------------------------

export interface ClientAccount {
  session: { accessToken: string; user: { id: string } };
}

/** Client ids are per (device, user), as the app makes them: the server ties a client id to one user. */
const CLIENT_NAMESPACE = '6b1d5c2e-3f4a-5b6c-8d7e-9f0a1b2c3d4e';
export const clientIdFor = (deviceId: string, userId: string) => uuidv5(`${deviceId}/${userId}`, CLIENT_NAMESPACE);

export interface SimDevice {
  label: string;
  /** The user signed in on the device now. */
  userId: string;
  account: ClientAccount;
  teamId: string;
  driver: SqlDriver;
  store: DeviceStore;
  transport: FaultyTransport;
  /** Physical clock offset of this device (ms). */
  skewMs: number;
  /** The client id the device pushes under for the user signed in now (op_log.client_id). */
  readonly clientId: string;
  /**
   * One sync run for the user signed in when it starts (their outbox, cursor, client id and token,
   * whoever signs in meanwhile).
   */
  sync(options?: { batchSize?: number; pageSize?: number }): Promise<SyncResult>;
  /**
   * Someone else signs in on this device (a shared tablet): the store is opened for them (sync/store.ts
   * switchUser), and later runs and requests speak for them.
   */
  signIn(account: ClientAccount): Promise<boolean>;
}

export interface DeviceOptions {
  label: string;
  teamId: string;
  policy?: FaultPolicy;
  /** The device's wall clock; default real time plus `skewMs`. */
  now?: () => number;
  skewMs?: number;
  batchSize?: number;
  pageSize?: number;
  /** Reopen an existing database (a restarted app). */
  driver?: SqlDriver;
  /** Leave the store unscoped (the old single-user form); default: opened for the account, as the app does. */
  unscoped?: boolean;
}

export async function openDevice(endpoint: Endpoint, account: ClientAccount, options: DeviceOptions): Promise<SimDevice> {
  const driver = options.driver ?? (await openMemoryDriver());
  const skewMs = options.skewMs ?? 0;
  const now = options.now ?? (() => Date.now() + skewMs);
  const store = await DeviceStore.open(driver, { now });
  if (!options.unscoped) await store.switchUser(account.session.user.id);
  let signedIn = account;
  const transport = new FaultyTransport(endpoint.base, () => signedIn.session.accessToken, options.policy);
  const device: SimDevice = {
    label: options.label,
    userId: account.session.user.id,
    account,
    teamId: options.teamId,
    driver,
    store,
    transport,
    skewMs,
    get clientId() {
      return options.unscoped ? store.clientId : clientIdFor(store.clientId, signedIn.session.user.id);
    },
    sync: (o = {}) => {
      const userId = signedIn.session.user.id;
      return synchronize({
        store,
        transport,
        teamId: options.teamId,
        ...(options.unscoped ? {} : { userId, clientId: clientIdFor(store.clientId, userId) }),
        batchSize: o.batchSize ?? options.batchSize,
        pageSize: o.pageSize ?? options.pageSize,
      });
    },
    signIn: async (next) => {
      const wiped = await store.switchUser(next.session.user.id);
      signedIn = next;
      device.account = next;
      device.userId = next.session.user.id;
      return wiped;
    },
  };
  return device;
}

// ---- reading state in protocol form -------------------------------------------------------------

export type Fields = Record<string, unknown>;
export type TableState = Map<string, Fields>;

export interface SyncedState {
  observations: TableState;
  sessions: TableState;
  cues: TableState;
  skaters: TableState;
  groups: TableState;
  runs: TableState;
  crossings: TableState;
  targets: TableState;
}

export const STATE_TABLES = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'runs', 'crossings', 'targets'] as const;

/** The clock's tables, read through the device's own mapping (sync/fields.ts), live rows only. */
const CLOCK_TABLES = ['runs', 'crossings', 'targets'] as const;

async function clockState(driver: SqlDriver, teamId: string, table: (typeof CLOCK_TABLES)[number]): Promise<TableState> {
  const hidden = table === 'targets' ? '' : ' AND deleted = 0';
  const state: TableState = new Map();
  for (const r of await driver.all<Record<string, SqlValue>>(`SELECT id, ${selectColumns(table)} FROM ${table} WHERE team_id = ?${hidden}`, [teamId])) {
    const { id, ...fields } = decodeRow<Fields & { id: string }>(table, r);
    state.set(id, fields);
  }
  return state;
}

const bool = (v: unknown) => v === true || v === 1;

/** The device's live synced records, in the protocol's field form. */
export async function deviceState(driver: SqlDriver, teamId: string): Promise<SyncedState & { tombstones: string[] }> {
  const observations: TableState = new Map();
  for (const r of await driver.all<Record<string, string | number | null>>(
    `SELECT id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by, author_name, acknowledged_at, deleted
       FROM observations WHERE team_id = ?`,
    [teamId],
  )) {
    if (r.deleted) continue;
    observations.set(String(r.id), {
      sessionId: r.session_id, skaterId: r.skater_id, cueId: r.cue_id, mark: r.mark, note: r.note, noteShared: bool(r.note_shared),
      createdAt: r.created_at, createdBy: r.created_by, authorName: r.author_name, acknowledgedAt: r.acknowledged_at ?? null,
    });
  }
  const tombstones = (await driver.all<{ id: string }>(`SELECT id FROM observations WHERE team_id = ? AND deleted = 1`, [teamId])).map((r) => r.id);
  const sessions: TableState = new Map();
  for (const r of await driver.all<Record<string, string>>(
    `SELECT id, day, rink, title, focus_cue_ids, created_at, created_by FROM sessions WHERE team_id = ?`,
    [teamId],
  )) {
    sessions.set(r.id, { day: r.day, rink: r.rink, title: r.title, focusCueIds: JSON.parse(r.focus_cue_ids), createdAt: r.created_at, createdBy: r.created_by });
  }
  const cues: TableState = new Map();
  for (const r of await driver.all<Record<string, string | number>>(`SELECT id, phase, label, sort_order, archived FROM cues WHERE team_id = ?`, [teamId])) {
    cues.set(String(r.id), { phase: r.phase, label: r.label, sortOrder: Number(r.sort_order), archived: bool(r.archived) });
  }
  const skaters: TableState = new Map();
  for (const r of await driver.all<Record<string, string | number | null>>(
    `SELECT id, display_name, group_id, has_account, retired FROM skaters WHERE team_id = ?`,
    [teamId],
  )) {
    skaters.set(String(r.id), { displayName: r.display_name, groupId: r.group_id ?? null, hasAccount: bool(r.has_account), retired: bool(r.retired) });
  }
  const groups: TableState = new Map();
  for (const r of await driver.all<Record<string, string | number>>(`SELECT id, name, sort_order FROM groups WHERE team_id = ?`, [teamId])) {
    groups.set(String(r.id), { name: r.name, sortOrder: Number(r.sort_order) });
  }
  const [runs, crossings, targets] = await Promise.all(CLOCK_TABLES.map((table) => clockState(driver, teamId, table)));
  return { observations, sessions, cues, skaters, groups, runs, crossings, targets, tombstones };
}

/** The server's live records as a coach pulls them from cursor 0 (no faults, pages of 1000). */
export async function serverState(endpoint: Endpoint, token: string, teamId: string): Promise<SyncedState & { pulled: number }> {
  const transport = new FaultyTransport(endpoint.base, () => token);
  const latest = new Map<string, { seq: number; table: string; id: string; fields: Fields | null }>();
  // Evictions (records this caller may no longer see) remove what earlier pages gave.
  const evicted = (page: { evictions: { table: string; id: string }[] }) => {
    for (const e of page.evictions) latest.delete(`${e.table}:${e.id}`);
  };
  let cursor = 0;
  let pulled = 0;
  for (;;) {
    const page = await transport.pull({ teamId, cursor, limit: 1000 });
    for (const c of page.changes) latest.set(`${c.table}:${c.id}`, { seq: c.serverSeq, table: c.table, id: c.id, fields: c.fields });
    for (const t of page.tombstones) latest.set(`${t.table}:${t.id}`, { seq: t.serverSeq, table: t.table, id: t.id, fields: null });
    evicted(page);
    pulled += page.changes.length + page.tombstones.length;
    cursor = page.nextCursor;
    if (!page.hasMore) break;
  }
  const state: SyncedState = {
    observations: new Map(),
    sessions: new Map(),
    cues: new Map(),
    skaters: new Map(),
    groups: new Map(),
    runs: new Map(),
    crossings: new Map(),
    targets: new Map(),
  };
  for (const row of latest.values()) {
    if (!row.fields) continue;
    const target = (state as unknown as Record<string, TableState>)[row.table];
    if (!target) continue;
    const fields = { ...row.fields };
    if (row.table === 'observations') fields.acknowledgedAt = fields.acknowledgedAt ?? null;
    if (row.table === 'skaters') fields.groupId = fields.groupId ?? null;
    target.set(row.id, fields);
  }
  return { ...state, pulled };
}

/**
 * What a skater (or their guardian) may see of a team, computed from a coach's view by the
 * contract (shared/SYNC.md "Pull"; shared/sync-tables.ts viewerRows): their own notes only, a
 * private note's text blank; the team's sessions and cues; their own profile; their own group.
 */
export function skaterView(coach: SyncedState, skaterId: string): SyncedState {
  const own = coach.skaters.get(skaterId);
  const groupId = (own?.groupId as string | null | undefined) ?? null;
  const observations: TableState = new Map();
  for (const [id, o] of coach.observations) if (o.skaterId === skaterId) observations.set(id, { ...o, note: o.noteShared ? o.note : '' });
  const ownOnly = (table: TableState, keep: (fields: Fields) => boolean): TableState => new Map([...table].filter(([, fields]) => keep(fields)));
  const runs = ownOnly(coach.runs, (r) => r.skaterId === skaterId);
  return {
    observations,
    sessions: new Map(coach.sessions),
    cues: new Map(coach.cues),
    skaters: new Map(own ? [[skaterId, own]] : []),
    groups: new Map(groupId && coach.groups.has(groupId) ? [[groupId, coach.groups.get(groupId)!]] : []),
    // Their own runs, the crossings of those runs, their own targets (shared/sync-tables.ts viewerRows).
    runs,
    crossings: ownOnly(coach.crossings, (c) => runs.has(c.runId as string)),
    targets: ownOnly(coach.targets, (t) => t.skaterId === skaterId),
  };
}

/** Every table the device store holds rows in for its user (the outbox is the user's own, parked). */
export const HELD_TABLES = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'runs', 'crossings', 'targets', 'sync_shadow'] as const;

/**
 * What a skater's device must not hold, whatever the state of a row (live, deleted, shadow): any
 * other skater's note or profile, another group, the text of a note that is private now.
 * `privateTexts` are the texts the skater may not read: those of notes private on the server, less
 * any the skater may read on a note of their own (a group tap writes one text on several skaters'
 * notes, each shared or not on its own). The caller makes texts distinct enough that a plain
 * substring search finds them in any column, JSON-encoded or not.
 */
export async function skaterLeaks(driver: SqlDriver, skaterId: string, groupId: string | null, privateTexts: Iterable<string>): Promise<string[]> {
  const leaks: string[] = [];
  for (const r of await driver.all<{ id: string; skater_id: string; note: string; note_shared: number }>(`SELECT id, skater_id, note, note_shared FROM observations`)) {
    if (r.skater_id !== skaterId) leaks.push(`observation ${r.id} of skater ${r.skater_id}`);
    else if (!r.note_shared && r.note !== '') leaks.push(`observation ${r.id}: private note text ${JSON.stringify(r.note)}`);
  }
  for (const r of await driver.all<{ id: string }>(`SELECT id FROM skaters WHERE id <> ?`, [skaterId])) leaks.push(`skater ${r.id}`);
  for (const r of await driver.all<{ id: string; skater_id: string }>(`SELECT id, skater_id FROM runs WHERE skater_id <> ?`, [skaterId])) {
    leaks.push(`run ${r.id} of skater ${r.skater_id}`);
  }
  for (const r of await driver.all<{ id: string }>(`SELECT id FROM crossings WHERE run_id NOT IN (SELECT id FROM runs WHERE skater_id = ?)`, [skaterId])) {
    leaks.push(`crossing ${r.id} of a run not theirs`);
  }
  for (const r of await driver.all<{ id: string }>(`SELECT id FROM targets WHERE skater_id <> ?`, [skaterId])) leaks.push(`target ${r.id}`);
  for (const r of await driver.all<{ id: string }>(`SELECT id FROM groups WHERE id IS NOT ?`, [groupId])) leaks.push(`group ${r.id}`);
  for (const table of HELD_TABLES) {
    const text = JSON.stringify(await driver.all(`SELECT * FROM ${table}`));
    for (const secret of privateTexts) if (secret && text.includes(secret)) leaks.push(`private text ${JSON.stringify(secret)} held in ${table}`);
  }
  return leaks;
}

const stable = (value: unknown): string =>
  JSON.stringify(value, (_key, v) => (v && typeof v === 'object' && !Array.isArray(v) ? Object.fromEntries(Object.entries(v).sort(([a], [b]) => a.localeCompare(b))) : v));

/** Differences between two tables (ids missing, extra, or with other values), at most `limit`. */
export function diffTable(name: string, expected: TableState, actual: TableState, limit = 5): string[] {
  const out: string[] = [];
  for (const [id, fields] of expected) {
    const other = actual.get(id);
    if (!other) out.push(`${name} ${id}: missing`);
    else if (stable(fields) !== stable(other)) out.push(`${name} ${id}: ${stable(other)} != server ${stable(fields)}`);
  }
  for (const id of actual.keys()) if (!expected.has(id)) out.push(`${name} ${id}: extra (not on the server)`);
  return out.slice(0, limit).concat(out.length > limit ? [`${name}: ... ${out.length - limit} more`] : []);
}
