/**
 * The evening review's routes against hostile requests (issue #10): every route of
 * server/routes/review.ts, review-laps.ts, review-export.ts and review-follow-up.ts is sent
 * repeated, array- and object-shaped, empty, NUL, emoji, right-to-left and 10 kB query values,
 * numbers at their limits, weeks and days that do not exist, prototype names as keys and values,
 * odd path ids, and every role that must not see the answer. Each must come back as a 4xx in the
 * one error shape with a message naming what is wrong: never a 500, never a hang. Ranges at the
 * edges of the years the review knows (2000-2100) answer 200, and so does a team with nothing in it.
 */
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { v4 as uuidv4 } from 'uuid';
import type { Skater } from '../../shared/schemas';
import { addSkater, expectError, expectNoStack, inviteAndAccept, signUpCoach, startTestServer, type Account, type Coach, type TestServer } from './helpers';
import { cueOf, makeReviewTeam, pushNotes, type ReviewTeam } from './review-helpers';
import { pushOk } from './sync-helpers';
import { crossingCreate, runCreate } from './support/clock-ops';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
let otherGroupId: string;
let ownGroupId: string;
let retired: Skater;
let deleted: Skater;
let removed: Account;
let empty: Coach;
let emptySkater: Skater;
let cueId: string;

beforeAll(async () => {
  server = await startTestServer();
  const { app, dataSource } = server;
  team = await makeReviewTeam(app, dataSource, 'revhost');
  other = await makeReviewTeam(app, dataSource, 'revhostother');
  cueId = cueOf(team, 'straight').id;
  await pushNotes(
    app,
    team,
    team.headDevice,
    ['2026-09-29', '2026-09-30', '2026-10-01', '2026-10-08'].map((day) => ({
      skaterId: team.skaterA.id,
      cueId,
      mark: 'needs_work' as const,
      createdAt: `${day}T10:00:00.000Z`,
      note: 'knee over toe',
      noteShared: true,
    })),
  );
  const group = await request(app).post(`/api/teams/${other.teamId}/groups`).set(other.head.auth).send({ name: 'Juniors' }).expect(201);
  otherGroupId = group.body.id;
  ownGroupId = (await request(app).post(`/api/teams/${team.teamId}/groups`).set(team.head.auth).send({ name: 'Seniors' }).expect(201)).body.id;
  retired = await addSkater(app, team.head, 'Retired Rijder');
  await request(app).patch(`/api/teams/${team.teamId}/skaters/${retired.id}`).set(team.head.auth).send({ retired: true }).expect(200);
  deleted = await addSkater(app, team.head, 'Deleted Rijder');
  await dataSource.query(`UPDATE skaters SET deleted_at = now() WHERE id = $1`, [deleted.id]);
  removed = await inviteAndAccept(app, team.head, 'coach', { label: 'revhostremoved' });
  await request(app).delete(`/api/teams/${team.teamId}/members/${removed.session.user.id}`).set(team.head.auth).expect(204);
  empty = await signUpCoach(app, 'revhostempty');
}, 60_000);

afterAll(() => server.close());

// ---------------------------------------------------------------------------------------------
// The routes, each with a query that answers 200 for the head coach.

interface Route {
  name: string;
  path: (t: { teamId: string; skaterId: string }) => string;
  query: Record<string, string>;
  /** Query fields the route reads. */
  fields: string[];
  coachOnly: boolean;
  /** A path id the route reads (for the path-param cases). */
  pathId?: 'skater' | 'group' | 'week';
}

const routes: Route[] = [
  { name: 'skater weeks', path: (t) => `skaters/${t.skaterId}/weeks`, query: { from: '2026-W38', to: '2026-W42' }, fields: ['from', 'to'], coachOnly: false, pathId: 'skater' },
  { name: 'group weeks', path: () => 'groups/all/weeks', query: { from: '2026-W38', to: '2026-W42' }, fields: ['from', 'to'], coachOnly: true, pathId: 'group' },
  { name: 'one week', path: () => 'week/2026-W40', query: { groupId: 'all' }, fields: ['groupId'], coachOnly: true, pathId: 'week' },
  { name: 'cell', path: (t) => `skaters/${t.skaterId}/cells`, query: { cueId: '', week: '2026-W40' }, fields: ['cueId', 'week'], coachOnly: false, pathId: 'skater' },
  { name: 'laps', path: (t) => `skaters/${t.skaterId}/laps`, query: { distanceM: '1500', track: 'long', from: '2026-W30', to: '2026-W42' }, fields: ['distanceM', 'track', 'from', 'to'], coachOnly: false, pathId: 'skater' },
  { name: 'export', path: () => 'export.csv', query: { kind: 'observations', from: '2026-09-01', to: '2026-10-31', skaterIds: '' }, fields: ['kind', 'from', 'to', 'skaterIds'], coachOnly: true },
  { name: 'sheet', path: (t) => `skaters/${t.skaterId}/sheet`, query: { week: '2026-W40' }, fields: ['week'], coachOnly: true, pathId: 'skater' },
  { name: 'skater follow-up', path: (t) => `skaters/${t.skaterId}/follow-up`, query: { threshold: '3', from: '2026-W38', to: '2026-W42' }, fields: ['threshold', 'from', 'to'], coachOnly: false, pathId: 'skater' },
  { name: 'group follow-up', path: () => 'groups/all/follow-up', query: { threshold: '3', from: '2026-W38', to: '2026-W42' }, fields: ['threshold', 'from', 'to'], coachOnly: true, pathId: 'group' },
  { name: 'runs by week', path: (t) => `skaters/${t.skaterId}/runs-by-week`, query: { from: '2026-W38', to: '2026-W42' }, fields: ['from', 'to'], coachOnly: false, pathId: 'skater' },
];

/** The route's valid query with the team's own ids filled in. */
const validQuery = (route: Route): Record<string, string> => ({
  ...route.query,
  ...('cueId' in route.query ? { cueId } : {}),
  ...('skaterIds' in route.query ? { skaterIds: team.skaterA.id } : {}),
});

/** Builds a query string by hand, so repeated keys, brackets and raw escapes reach the server as sent. */
const qs = (pairs: [string, string][]) => pairs.map(([k, v]) => `${k}=${v}`).join('&');
const enc = encodeURIComponent;

const url = (teamId: string, path: string, query: string) => `/api/teams/${teamId}/review/${path}${query ? `?${query}` : ''}`;

const send = (who: Account | null, teamId: string, path: string, query: string) => {
  const req = request(server.app).get(url(teamId, path, query)).timeout(15_000);
  return who ? req.set(who.auth) : req;
};

/** The valid query with `field` replaced by the raw pairs given (already encoded). */
function withField(route: Route, field: string, pairs: [string, string][]): string {
  const base = Object.entries(validQuery(route))
    .filter(([k]) => k !== field)
    .map(([k, v]): [string, string] => [k, enc(v)]);
  return qs([...base, ...pairs]);
}

const asHead = (route: Route, query: string, skaterId = team.skaterA.id) =>
  send(team.head, team.teamId, route.path({ teamId: team.teamId, skaterId }), query);

/** A 400 in the error shape whose message names `name`. */
function expectNamed(res: request.Response, name: string) {
  expectError(res, 400, 'validation');
  expect(res.body.error.message).toContain(name);
  expect(res.body.error.message.length).toBeLessThan(2_000);
}

const counts: Record<string, number> = {};
const tally = (route: string) => {
  counts[route] = (counts[route] ?? 0) + 1;
};
afterAll(() => {
  // The figures for the report: cases tried per route.
  console.log(`review-hostile cases per route: ${JSON.stringify(counts)}`);
});

// ---------------------------------------------------------------------------------------------

describe('every route answers its valid query (the baseline the hostile cases change)', () => {
  it.each(routes.map((r) => [r.name, r] as const))('%s: 200 for the head coach', async (name, route) => {
    tally(name);
    const res = await asHead(route, qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)])));
    expectNoStack(res);
    expect(res.status).toBe(200);
  });
});

const TEN_KB = 'x'.repeat(10_240);
/** Hostile shapes of one field's value: [label, pairs for `field`]. */
const shapes = (field: string, valid: string): [string, [string, string][]][] => [
  ['repeated', [[field, enc(valid)], [field, enc(valid)]]],
  ['repeated, two values', [[field, enc(valid)], [field, 'other']]],
  ['array brackets', [[`${field}[]`, 'x']]],
  ['array index', [[`${field}[0]`, 'x']]],
  ['object brackets', [[`${field}[a]`, 'b']]],
  ['empty', [[field, '']]],
  ['NUL byte', [[field, '%00']]],
  ['NUL inside a valid value', [[field, `${enc(valid)}%00`]]],
  ['emoji', [[field, enc('⛸️🏁')]]],
  ['right-to-left text', [[field, enc('\u202Eמרוץ')]]],
  ['10 kB', [[field, TEN_KB]]],
  ['constructor', [[field, 'constructor']]],
  ['__proto__', [[field, '__proto__']]],
  ['toString', [[field, 'toString']]],
  ['a bad escape', [[field, '%E0%A4%A']]],
];

describe('hostile values of every query field: a 400 naming the field', () => {
  const cases = routes.flatMap((route) =>
    route.fields.flatMap((field) =>
      shapes(field, route.query[field] || 'x').map(([label, pairs]) => [route.name, field, label, route, pairs] as const),
    ),
  );
  it.each(cases)('%s ?%s: %s', async (name, field, label, route, pairs) => {
    tally(name);
    const res = await asHead(route, withField(route, field, pairs));
    expectNamed(res, field);
    if (label.startsWith('repeated')) {
      // Both values may be fine on their own: the message says what is wrong.
      expect(res.body.error.message).toBe(`${field} is given 2 times: give it once`);
      expect(res.body.error.fields).toEqual({ [field]: `${field} is given 2 times: give it once` });
    }
  });
  it.each(routes.map((r) => [r.name, r] as const))('%s: a prototype name given twice is named too', async (name, route) => {
    tally(name);
    const res = await asHead(route, withField(route, '-', [['__proto__', '1'], ['__proto__', '2']]));
    expectNamed(res, '__proto__ is given 2 times');
    expect(Object.keys(res.body.error.fields)).toEqual(['__proto__']);
  });
});

describe('prototype names and unknown fields as query keys: a 400 naming the key', () => {
  const keys = ['constructor', '__proto__', 'toString', 'hasOwnProperty', 'valueOf', 'unknown'];
  const cases = routes.flatMap((route) => keys.map((key) => [route.name, key, route] as const));
  it.each(cases)('%s ?%s=1', async (name, key, route) => {
    tally(name);
    const res = await asHead(route, withField(route, '-', [[key, '1']]));
    expectNamed(res, key);
    // It names the key and what the view reads instead.
    const reads = route.fields.length === 1 ? route.fields[0] : `${route.fields.slice(0, -1).join(', ')} and ${route.fields[route.fields.length - 1]}`;
    expect(res.body.error.message).toBe(`"${key}" is not read here: this view reads ${reads}`);
  });
  it('several unknown keys, one of them 10 kB: three named, the rest counted, the long one cut', async () => {
    tally('skater weeks');
    const route = routes[0];
    const res = await asHead(route, qs([[TEN_KB, '1'], ['a', '1'], ['b', '1'], ['c', '1'], ['d', '1']]));
    expectNamed(res, 'and 2 more are not read here: this view reads from and to');
    expect(res.body.error.message.length).toBeLessThan(200);
  });
});

describe('numbers at their limits', () => {
  const thresholds = ['0', '-1', '21', '1e309', '9007199254740993', 'NaN', 'Infinity', '3.5', '0x3', ' 3', '+3', '03e0'];
  const followUps = routes.filter((r) => r.fields.includes('threshold'));
  it.each(followUps.flatMap((r) => thresholds.map((t) => [r.name, t, r] as const)))('%s threshold=%s is a 400', async (name, value, route) => {
    tally(name);
    expectNamed(await asHead(route, withField(route, 'threshold', [['threshold', enc(value)]])), 'threshold');
  });
  it.each(followUps.map((r) => [r.name, r] as const))('%s threshold=1 and 20 (the ends) are fine', async (name, route) => {
    for (const value of ['1', '20', '003']) {
      tally(name);
      const res = await asHead(route, withField(route, 'threshold', [['threshold', value]]));
      expect(res.status).toBe(200);
      expect(res.body.threshold).toBe(Number(value));
    }
  });

  const laps = routes.find((r) => r.name === 'laps')!;
  const distances = ['-400', '0', '1e9', '1000000000', '999999', '1500.5', '1e3', 'NaN', '9007199254740993', '401'];
  it.each(distances)('laps distanceM=%s is a 400', async (value) => {
    tally('laps');
    expectNamed(await asHead(laps, withField(laps, 'distanceM', [['distanceM', enc(value)]])), 'distanceM');
  });
  it.each(['ice', 'LONG', 'short ', 'constructor'])('laps track=%s is a 400 naming track', async (value) => {
    tally('laps');
    expectNamed(await asHead(laps, withField(laps, 'track', [['track', enc(value)]])), 'track');
  });
  it('laps track without distanceM is a 400 naming distanceM', async () => {
    tally('laps');
    expectNamed(await asHead(laps, qs([['track', 'short']])), 'distanceM');
  });
  it('laps: 500 m on the short track is fine', async () => {
    tally('laps');
    const res = await asHead(laps, qs([['distanceM', '500'], ['track', 'short']]));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ distanceM: 500, track: 'short' });
  });
});

describe('weeks and days that do not exist', () => {
  const badWeeks = ['2026-W54', '2026-W00', '0000-W01', '9999-W52', '2100-W53', '2025-W53', '1999-W52', '2101-W01', '2026-w01', '2026W01', ' 2026-W01', '2026-W1', '+2026-W01', '２０２６-W01'];
  const weekFields = routes.flatMap((r) => r.fields.filter((f) => f === 'from' || f === 'to' || f === 'week').map((f) => [r, f] as const)).filter(([r]) => r.name !== 'export');
  it.each(weekFields.flatMap(([r, f]) => badWeeks.map((w) => [r.name, f, w, r] as const)))('%s %s=%s is a 400', async (name, field, week, route) => {
    tally(name);
    expectNamed(await asHead(route, withField(route, field, [[field, enc(week)]])), field);
  });
  it.each(badWeeks)('one week path /week/%s is a 400 naming week', async (week) => {
    tally('one week');
    expectNamed(await send(team.head, team.teamId, `week/${enc(week)}`, ''), 'week');
  });

  const exportRoute = routes.find((r) => r.name === 'export')!;
  const badDays = ['2026-02-30', '2025-02-29', '2026-13-01', '2026-00-10', '2026-04-31', '1999-12-31', '2101-01-01', '0000-01-01', '2026-1-1', '2026-01-01T00:00', '20260101'];
  it.each((['from', 'to'] as const).flatMap((f) => badDays.map((d) => [f, d] as const)))('export %s=%s is a 400', async (field, day) => {
    tally('export');
    // The other end is kept close, so only the bad day can be the reason.
    const query = field === 'from' ? [['from', day], ['to', '2026-03-01']] : [['from', '2026-02-01'], ['to', day]];
    const res = await asHead(exportRoute, qs([['kind', 'runs'], ...(query as [string, string][])]));
    expectNamed(res, field);
  });
  it('export: from after to, and 367 days, are 400s naming the field', async () => {
    tally('export');
    tally('export');
    expectNamed(await asHead(exportRoute, qs([['kind', 'runs'], ['from', '2026-03-02'], ['to', '2026-03-01']])), 'from');
    expectNamed(await asHead(exportRoute, qs([['kind', 'runs'], ['from', '2026-01-01'], ['to', '2027-01-02']])), 'to');
  });
  it.each(['all', 'observation', 'runs,observations', 'RUNS'])('export kind=%s is a 400', async (kind) => {
    tally('export');
    expectNamed(await asHead(exportRoute, withField(exportRoute, 'kind', [['kind', enc(kind)]])), 'kind');
  });

  const ranged = routes.filter((r) => r.fields.includes('from') && r.name !== 'export');
  it.each(ranged.map((r) => [r.name, r] as const))('%s: from after to, and 105 weeks, are 400s', async (name, route) => {
    tally(name);
    tally(name);
    const keep = route.name === 'laps' ? [['distanceM', '1500'] as [string, string]] : route.name.includes('follow-up') ? [['threshold', '3'] as [string, string]] : [];
    expectNamed(await asHead(route, qs([...keep, ['from', '2026-W10'], ['to', '2026-W09']])), 'from');
    expectNamed(await asHead(route, qs([...keep, ['from', '2024-W01'], ['to', '2026-W01']])), 'to');
  });
});

describe('ranges at the edges of the years the review knows answer 200', () => {
  const ranged = routes.filter((r) => r.fields.includes('from') && r.name !== 'export');
  const edges: [string, [string, string][]][] = [
    ['across the 2100 boundary (2099-W50..2100-W05)', [['from', '2099-W50'], ['to', '2100-W05']]],
    ['the last weeks (2100-W40..2100-W52)', [['from', '2100-W40'], ['to', '2100-W52']]],
    ['from the last week alone', [['from', '2100-W52']]],
    ['to the first week alone', [['to', '2000-W01']]],
    ['to the second week alone', [['to', '2000-W02']]],
    ['the first week (2000-W01..2000-W01)', [['from', '2000-W01'], ['to', '2000-W01']]],
    ['2026-W53 (a 53-week year)', [['from', '2026-W53'], ['to', '2026-W53']]],
    ['104 weeks', [['from', '2025-W01'], ['to', '2026-W52']]],
  ];
  it.each(ranged.flatMap((r) => edges.map(([label, pairs]) => [r.name, label, r, pairs] as const)))('%s %s', async (name, _label, route, pairs) => {
    tally(name);
    const res = await asHead(route, qs(pairs));
    expectNoStack(res);
    expect(res.status).toBe(200);
    expect(res.body.from).toMatch(/^\d{4}-W\d{2}$/);
    if (res.body.weeks) expect(res.body.weeks.every((w: string) => /^(20\d\d|2100)-W\d\d$/.test(w))).toBe(true);
  });

  it.each(ranged.filter((r) => r.name !== 'laps').map((r) => [r.name, r] as const))('%s ?to=2000-W03 alone starts at 2000-W01 (no week before it)', async (name, route) => {
    tally(name);
    const res = await asHead(route, qs([['to', '2000-W03']]));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ from: '2000-W01', to: '2000-W03' });
    if (res.body.weeks) expect(res.body.weeks).toEqual(['2000-W01', '2000-W02', '2000-W03']);
  });

  const weekOnly = [
    ['one week', (w: string) => send(team.head, team.teamId, `week/${w}`, '')],
    ['cell', (w: string) => send(team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, qs([['cueId', cueId], ['week', w]]))],
    ['sheet', (w: string) => send(team.head, team.teamId, `skaters/${team.skaterA.id}/sheet`, qs([['week', w]]))],
  ] as const;
  it.each(weekOnly.flatMap(([name, get]) => ['2000-W01', '2100-W52', '2026-W53'].map((w) => [name, w, get] as const)))('%s week %s', async (name, week, get) => {
    tally(name);
    const res = await get(week);
    expectNoStack(res);
    expect(res.status).toBe(200);
    expect(res.body.week).toBe(week);
  });
  it('sheet of 2100-W52 ends on its Sunday', async () => {
    tally('sheet');
    const res = await send(team.head, team.teamId, `skaters/${team.skaterA.id}/sheet`, qs([['week', '2100-W52']]));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ firstDay: '2100-12-27', lastDay: '2101-01-02' });
  });

  const exportRoute = routes.find((r) => r.name === 'export')!;
  it.each([
    ['2000-01-01', '2000-12-31'],
    ['2099-01-01', '2099-12-31'],
    ['2099-07-01', '2099-12-31'],
  ])('export %s..%s', async (from, to) => {
    for (const kind of ['observations', 'runs']) {
      tally('export');
      const res = await asHead(exportRoute, qs([['kind', kind], ['from', from], ['to', to]]));
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toMatch(/text\/csv/);
      expect(res.text.split('\n').filter((l) => l.trim() !== '')).toHaveLength(1);
    }
  });
  it('export: days stop at 2099-12-31 (no record is later), and the 400 says so', async () => {
    for (const [from, to, field] of [['2100-01-01', '2100-12-31', 'from'], ['2099-07-01', '2100-01-01', 'to']]) {
      tally('export');
      const res = await asHead(exportRoute, qs([['kind', 'runs'], ['from', from], ['to', to]]));
      expectNamed(res, field);
      expect(res.body.error.fields[field]).toContain('2099-12-31');
    }
  });
});

describe('export skaterIds', () => {
  const exportRoute = routes.find((r) => r.name === 'export')!;
  const withIds = (ids: string) => asHead(exportRoute, qs([['kind', 'observations'], ['from', '2026-09-01'], ['to', '2026-10-31'], ['skaterIds', ids]]));
  const rows = (res: request.Response) => res.text.split('\n').filter((l) => l.trim() !== '').length - 1;

  it('duplicates (and an upper-case copy) count once', async () => {
    tally('export');
    const once = await withIds(team.skaterA.id);
    const twice = await withIds([team.skaterA.id, team.skaterA.id, team.skaterA.id.toUpperCase(), ` ${team.skaterA.id}`].join(','));
    expect(once.status).toBe(200);
    expect(twice.status).toBe(200);
    expect(rows(once)).toBe(4);
    expect(rows(twice)).toBe(4);
  });
  const badIds: [string, () => string, () => string][] = [
    ['a non-UUID', () => `${team.skaterA.id},not-a-uuid`, () => 'not-a-uuid'],
    ["another team's skater", () => `${team.skaterA.id},${other.skaterA.id}`, () => other.skaterA.id],
    ['a deleted skater', () => deleted.id, () => deleted.id],
    ['an unknown UUID', () => '00000000-0000-4000-8000-000000000000', () => '00000000-0000-4000-8000-000000000000'],
    ['only commas', () => ',,,', () => 'skaterIds'],
    ['constructor', () => 'constructor', () => 'constructor'],
    ['a UUID with NUL', () => `${team.skaterA.id}%00`, () => 'skaterIds'],
  ];
  it.each(badIds)('%s is a 400 naming it', async (_label, ids, named) => {
    tally('export');
    const res = await withIds(ids().includes('%00') ? ids() : enc(ids()));
    expectNamed(res, named());
    expect(res.body.error.fields?.skaterIds).toBeDefined();
  });
  it('a retired skater is fine', async () => {
    tally('export');
    expect((await withIds(retired.id)).status).toBe(200);
  });
  it('380 unknown ids (as many as fit in a request line): a 400 that names a few, not all', async () => {
    tally('export');
    const ids = Array.from({ length: 380 }, () => uuidv4());
    const res = await withIds(ids.join(','));
    expectNamed(res, ids[0]);
    expect(res.body.error.message).toContain('380 ids');
    expect(res.body.error.message).not.toContain(ids[10]);
  });
  it('501 ids: refused with a 4xx, never a 500', async () => {
    tally('export');
    const res = await withIds(Array.from({ length: 501 }, () => uuidv4()).join(','));
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
  });
  it('1000 ids: refused with a 4xx, never a 500', async () => {
    tally('export');
    const res = await withIds(Array.from({ length: 1000 }, () => uuidv4()).join(','));
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
  });
});

describe('path ids', () => {
  const skaterRoutes = routes.filter((r) => r.pathId === 'skater');
  const badSkaters: [string, () => string][] = [
    ['a non-UUID', () => 'not-a-uuid'],
    ['constructor', () => 'constructor'],
    ['__proto__', () => '__proto__'],
    ['an unknown UUID', () => uuidv4()],
    ["another team's skater", () => other.skaterA.id],
    ['a deleted skater', () => deleted.id],
    ['10 kB', () => TEN_KB],
    ['NUL', () => '%00'],
  ];
  it.each(skaterRoutes.flatMap((r) => badSkaters.map(([label, id]) => [r.name, label, r, id] as const)))('%s for %s: 404', async (name, _label, route, id) => {
    tally(name);
    const res = await asHead(route, qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)])), id());
    expectError(res, 404, 'not_found');
    expect(res.body.error.message).toMatch(/skater/i);
  });
  it.each(skaterRoutes.map((r) => [r.name, r] as const))('%s for a retired skater: 200', async (name, route) => {
    tally(name);
    const res = await asHead(route, qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)])), retired.id);
    expect(res.status).toBe(200);
  });

  const groupRoutes = ['weeks', 'follow-up'];
  const badGroups: [string, () => string][] = [
    ['constructor', () => 'constructor'],
    ['__proto__', () => '__proto__'],
    ['toString', () => 'toString'],
    ['ALL', () => 'ALL'],
    ['a non-UUID', () => 'juniors'],
    ['an unknown UUID', () => uuidv4()],
    ["another team's group", () => otherGroupId],
  ];
  it.each(groupRoutes.flatMap((g) => badGroups.map(([label, id]) => [g, label, id] as const)))('groups/…/%s for %s: 404', async (kind, _label, id) => {
    tally(`group ${kind}`);
    const res = await send(team.head, team.teamId, `groups/${enc(id())}/${kind}`, '');
    expectError(res, 404, 'not_found');
    expect(res.body.error.message).toMatch(/group/i);
  });
  it.each(['constructor', 'juniors', '__proto__'])('one week ?groupId=%s is a 400 naming groupId', async (id) => {
    tally('one week');
    expectNamed(await send(team.head, team.teamId, 'week/2026-W40', qs([['groupId', id]])), 'groupId');
  });
  it("one week ?groupId=<another team's group> is a 404", async () => {
    tally('one week');
    expectError(await send(team.head, team.teamId, 'week/2026-W40', qs([['groupId', otherGroupId]])), 404, 'not_found');
  });
  it.each(['an unknown UUID', "another team's cue"])('cell ?cueId=<%s> is a 404 naming the cue', async (label) => {
    tally('cell');
    const id = label === 'an unknown UUID' ? uuidv4() : cueOf(other, 'straight').id;
    const res = await send(team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, qs([['cueId', id], ['week', '2026-W40']]));
    expectError(res, 404, 'not_found');
    expect(res.body.error.message).toMatch(/cue/i);
  });
  it('cell: a deleted cue is a 404, an archived one still answers (its notes stay)', async () => {
    const [archivedCue, deletedCue] = team.cues.slice(-2);
    await server.dataSource.query(`UPDATE cues SET archived = true WHERE id = $1`, [archivedCue.id]);
    await server.dataSource.query(`UPDATE cues SET deleted_at = now() WHERE id = $1`, [deletedCue.id]);
    const cell = (id: string) => send(team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, qs([['cueId', id], ['week', '2026-W40']]));
    tally('cell');
    tally('cell');
    expect((await cell(archivedCue.id)).status).toBe(200);
    const gone = await cell(deletedCue.id);
    expectError(gone, 404, 'not_found');
    expect(gone.body.error.message).toMatch(/cue/i);
  });
  it.each(routes.map((r) => [r.name, r] as const))('%s: HEAD answers without a body and ends', async (name, route) => {
    tally(name);
    const res = await request(server.app)
      .head(url(team.teamId, route.path({ teamId: team.teamId, skaterId: team.skaterA.id }), qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)]))))
      .set(team.head.auth)
      .timeout(15_000);
    expect(res.status).toBe(200);
    expect(res.text ?? '').toBe('');
  });
  it.each(routes.flatMap((r) => ['not-a-team', 'constructor', 'other'].map((t) => [r.name, t, r] as const)))('%s under team %s: 404', async (name, which, route) => {
    tally(name);
    const teamId = which === 'other' ? other.teamId : which;
    const res = await send(team.head, teamId, route.path({ teamId, skaterId: team.skaterA.id }), qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)])));
    expectError(res, 404, 'not_found');
  });
});

describe('ids in upper case are the same ids', () => {
  const valid = (route: Route) => qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)]));
  it.each(routes.filter((r) => !r.coachOnly).map((r) => [r.name, r] as const))('%s: a skater asking for their own id in upper case: 200', async (name, route) => {
    tally(name);
    const res = await send(team.skaterAccount, team.teamId, route.path({ teamId: team.teamId, skaterId: team.skaterA.id.toUpperCase() }), valid(route));
    expect(res.status).toBe(200);
  });
  it('laps and the sheet name the skater in lower case, as stored', async () => {
    tally('laps');
    tally('sheet');
    const upper = team.skaterA.id.toUpperCase();
    const laps = await send(team.head, team.teamId, `skaters/${upper}/laps`, '');
    expect(laps.status).toBe(200);
    expect(laps.body.skaterId).toBe(team.skaterA.id);
    const sheet = await send(team.head, team.teamId, `skaters/${upper}/sheet`, qs([['week', '2026-W40']]));
    expect(sheet.body.skater.id).toBe(team.skaterA.id);
  });
  it('a group id in upper case: the same group, named in lower case', async () => {
    for (const kind of ['weeks', 'follow-up']) {
      tally(`group ${kind}`);
      const res = await send(team.head, team.teamId, `groups/${ownGroupId.toUpperCase()}/${kind}`, '');
      expect(res.status).toBe(200);
      if (kind === 'follow-up') expect(res.body.group).toBe(ownGroupId);
    }
    tally('one week');
    expect((await send(team.head, team.teamId, 'week/2026-W40', qs([['groupId', ownGroupId.toUpperCase()]]))).status).toBe(200);
  });
});

describe('roles', () => {
  const valid = (route: Route) => qs(Object.entries(validQuery(route)).map(([k, v]) => [k, enc(v)]));
  const expiredToken = () => {
    const { JWT_SECRET, JWT_ISSUER = 'boardside-server', JWT_AUDIENCE = 'boardside-app' } = process.env;
    return jwt.sign({ sid: uuidv4(), exp: Math.floor(Date.now() / 1000) - 60 }, JWT_SECRET!, {
      algorithm: 'HS256',
      subject: team.head.session.user.id,
      issuer: JWT_ISSUER,
      audience: JWT_AUDIENCE,
    });
  };
  it.each(routes.map((r) => [r.name, r] as const))('%s: no token, a garbage token, an expired one: 401', async (name, route) => {
    const path = route.path({ teamId: team.teamId, skaterId: team.skaterA.id });
    for (const auth of [null, 'Bearer garbage', 'Bearer ', 'Basic abc', `Bearer ${expiredToken()}`, `Bearer ${'a'.repeat(10_000)}`]) {
      tally(name);
      const req = request(server.app).get(url(team.teamId, path, valid(route))).timeout(15_000);
      const res = await (auth === null ? req : req.set('Authorization', auth));
      expectError(res, 401, 'unauthorized');
    }
  });
  it.each(routes.map((r) => [r.name, r] as const))('%s: a removed member gets no answer (401/403/404)', async (name, route) => {
    tally(name);
    const res = await send(removed, team.teamId, route.path({ teamId: team.teamId, skaterId: team.skaterA.id }), valid(route));
    expectNoStack(res);
    expect([401, 403, 404]).toContain(res.status);
    expect(res.body.error.message).toEqual(expect.any(String));
  });
  it('a removed skater no longer reads their own review', async () => {
    const profile = await addSkater(server.app, team.head, 'Removed Rijder');
    const gone = await inviteAndAccept(server.app, team.head, 'skater', { skaterId: profile.id, label: 'revhostgone' });
    const path = `skaters/${profile.id}/weeks`;
    expect((await send(gone, team.teamId, path, '')).status).toBe(200);
    await request(server.app).delete(`/api/teams/${team.teamId}/members/${gone.session.user.id}`).set(team.head.auth).expect(204);
    for (const route of routes.filter((r) => !r.coachOnly)) {
      tally(route.name);
      const res = await send(gone, team.teamId, route.path({ teamId: team.teamId, skaterId: profile.id }), valid(route));
      expectNoStack(res);
      expect([401, 403, 404]).toContain(res.status);
      expect(res.body.error.message).toEqual(expect.any(String));
    }
  });
  it.each(routes.map((r) => [r.name, r] as const))("%s: a skater asking for another skater, a guardian for a skater not theirs", async (name, route) => {
    const cases: [Account, string][] = [
      [team.skaterAccount, team.skaterB.id],
      [team.guardian, team.skaterA.id],
      [team.skaterAccount, retired.id],
      [other.skaterAccount, other.skaterA.id],
      [other.head, team.skaterA.id],
    ];
    for (const [who, skaterId] of cases) {
      tally(name);
      const res = await send(who, team.teamId, route.path({ teamId: team.teamId, skaterId }), valid(route));
      if (who === other.head || who === other.skaterAccount) expectError(res, 404, 'not_found');
      else if (route.coachOnly) expectError(res, 403, 'forbidden');
      else expectError(res, 404, 'not_found');
    }
  });
  it.each(routes.filter((r) => !r.coachOnly).map((r) => [r.name, r] as const))('%s: the skater for themselves and the guardian for theirs: 200', async (name, route) => {
    for (const [who, skaterId] of [[team.skaterAccount, team.skaterA.id], [team.guardian, team.skaterB.id]] as const) {
      tally(name);
      const res = await send(who, team.teamId, route.path({ teamId: team.teamId, skaterId }), valid(route));
      expect(res.status).toBe(200);
    }
  });
});

describe('teams far from UTC at the edges of the years', () => {
  it.each(['Pacific/Kiritimati', 'Pacific/Pago_Pago', 'America/St_Johns'])('%s: every route at 2000-W01 and 2100-W52 answers 200', async (timeZone) => {
    const far = await makeReviewTeam(server.app, server.dataSource, `revhosttz${timeZone.length}`, { people: false, timeZone });
    const farCue = cueOf(far, 'straight').id;
    // A note on the first Monday the review knows (2000-01-03, noon UTC: that day in all three
    // zones). Push refuses notes from before the team existed (2020 here), so it is moved there after.
    const [noteId] = await pushNotes(server.app, far, far.headDevice, [
      { skaterId: far.skaterA.id, cueId: farCue, mark: 'needs_work', createdAt: '2020-06-01T12:00:00.000Z' },
    ]);
    await server.dataSource.query(`UPDATE observations SET created_at = '2000-01-03T12:00:00Z' WHERE id = $1`, [noteId]);
    const get = (path: string, query: [string, string][] = []) => send(far.head, far.teamId, path, qs(query));
    const A = far.skaterA.id;
    const ranges: [string, string][][] = [[['from', '2000-W01'], ['to', '2000-W02']], [['from', '2100-W51'], ['to', '2100-W52']], [['to', '2000-W01']], [['from', '2100-W52']], []];
    for (const range of ranges) {
      for (const [name, path] of [
        ['skater weeks', `skaters/${A}/weeks`],
        ['group weeks', 'groups/all/weeks'],
        ['group follow-up', 'groups/none/follow-up'],
        ['skater follow-up', `skaters/${A}/follow-up`],
        ['runs by week', `skaters/${A}/runs-by-week`],
        ['laps', `skaters/${A}/laps`],
      ]) {
        tally(name);
        const res = await get(path, range);
        expectNoStack(res);
        expect(res.status).toBe(200);
        expect(res.body.timeZone).toBe(timeZone);
      }
    }
    const first = await get(`skaters/${A}/weeks`, [['from', '2000-W01'], ['to', '2000-W02']]);
    expect(first.body.rows[0].counts).toEqual([{ week: '2000-W01', needsWork: 1, good: 0 }]);
    for (const week of ['2000-W01', '2100-W52']) {
      for (const [name, path, query] of [
        ['one week', `week/${week}`, []],
        ['cell', `skaters/${A}/cells`, [['cueId', farCue], ['week', week]]],
        ['sheet', `skaters/${A}/sheet`, [['week', week]]],
      ] as [string, string, [string, string][]][]) {
        tally(name);
        const res = await get(path, query);
        expect(res.status).toBe(200);
        expect(res.body.week).toBe(week);
      }
    }
    for (const [from, to] of [['2000-01-01', '2000-01-31'], ['2099-12-01', '2099-12-31']]) {
      tally('export');
      const res = await get('export.csv', [['kind', 'observations'], ['from', from], ['to', to]]);
      expect(res.status).toBe(200);
      expect(res.text.split('\n').filter((l) => l.trim() !== '')).toHaveLength(from === '2000-01-01' ? 2 : 1);
    }
  }, 60_000);
});

describe('odd runs a device may push are read back, not a 500', () => {
  it('free laps last, a 100 km run, crossings at one instant, at 0 ms and at 24 h, too many and none', async () => {
    const skater = await addSkater(server.app, team.head, 'Odd Runs');
    const seeds: { distanceM: number; track?: 'long' | 'short'; status: string; at: string; crossings: number[] }[] = [
      { distanceM: 1500, status: 'finished', at: '2026-09-29T09:00:00.000Z', crossings: [25_000, 25_000, 80_000, 110_000] },
      { distanceM: 1500, status: 'finished', at: '2026-09-29T10:00:00.000Z', crossings: [0, 86_400_000] },
      { distanceM: 500, status: 'finished', at: '2026-09-29T11:00:00.000Z', crossings: Array.from({ length: 300 }, (_, i) => 10_000 + i * 100) },
      { distanceM: 500, track: 'short', status: 'finished', at: '2026-09-30T09:00:00.000Z', crossings: [] },
      { distanceM: 100_000, status: 'finished', at: '2026-09-30T10:00:00.000Z', crossings: [30_000, 60_000, 90_000] },
      { distanceM: 1000, status: 'stopped', at: '2026-09-30T11:00:00.000Z', crossings: [17_000] },
      { distanceM: 3000, status: 'running', at: '2026-10-01T08:00:00.000Z', crossings: [20_000] },
      // Free laps last: the laps view without a distance must not pick a distance with no splits.
      { distanceM: 0, status: 'finished', at: '2026-10-01T09:00:00.000Z', crossings: [30_000, 60_000, 90_000] },
    ];
    for (const seed of seeds) {
      const run = runCreate(team.headDevice, {
        skaterId: skater.id,
        distanceM: seed.distanceM,
        track: seed.track ?? 'long',
        day: seed.at.slice(0, 10),
        extra: { startedAt: seed.at, createdAt: seed.at, status: seed.status },
      });
      const reply = await pushOk(server.app, team.headDevice, team.teamId, [run, ...seed.crossings.map((atMs) => crossingCreate(team.headDevice, run.recordId, atMs))]);
      expect(reply.results.filter((r) => r.status !== 'applied')).toEqual([]);
    }
    const get = (path: string, query: [string, string][] = []) => send(team.head, team.teamId, `skaters/${skater.id}/${path}`, qs(query));
    const range: [string, string][] = [['from', '2026-W38'], ['to', '2026-W42']];
    tally('laps');
    const latest = await get('laps', range);
    expectNoStack(latest);
    expect(latest.status).toBe(200);
    expect(latest.body.distanceM).not.toBe(0);
    for (const [distanceM, track, runs] of [['1500', 'long', 2], ['500', 'long', 1], ['500', 'short', 1], ['100000', 'long', 1], ['1000', 'long', 1], ['3000', 'long', 1]] as const) {
      tally('laps');
      const res = await get('laps', [...range, ['distanceM', distanceM], ['track', track]]);
      expectNoStack(res);
      expect(res.status).toBe(200);
      expect(res.body.runs).toHaveLength(runs);
      expect(res.body.runs.every((r: { finishMs: number | null; state: string }) => r.state === 'complete' || r.finishMs === null)).toBe(true);
    }
    for (const [name, path, query] of [
      ['sheet', 'sheet', [['week', '2026-W40']]],
      ['skater follow-up', 'follow-up', range],
      ['runs by week', 'runs-by-week', range],
    ] as [string, string, [string, string][]][]) {
      tally(name);
      const res = await get(path, query);
      expectNoStack(res);
      expect(res.status).toBe(200);
    }
    tally('export');
    const csv = await send(team.head, team.teamId, 'export.csv', qs([['kind', 'runs'], ['from', '2026-09-28'], ['to', '2026-10-04'], ['skaterIds', skater.id]]));
    expect(csv.status).toBe(200);
    expect(csv.text.split('\n').filter((l) => l.trim() !== '')).toHaveLength(seeds.length + 1);
  }, 60_000);
});

describe('a team with nothing in it answers empty, not an error', () => {
  it('no skaters: group views, the week grid and the exports are empty', async () => {
    const get = (path: string, query = '') => send(empty, empty.teamId, path, query);
    for (const group of ['all', 'none']) {
      tally('group weeks');
      const weeks = await get(`groups/${group}/weeks`);
      expect(weeks.status).toBe(200);
      expect(weeks.body.rows).toEqual([]);
      expect(weeks.body.weeks).toHaveLength(8);
      tally('group follow-up');
      const follow = await get(`groups/${group}/follow-up`);
      expect(follow.status).toBe(200);
      expect(follow.body.skaters).toEqual([]);
    }
    tally('one week');
    const week = await get('week/2026-W40');
    expect(week.status).toBe(200);
    expect(week.body).toMatchObject({ skaters: [], cells: [] });
    for (const kind of ['observations', 'runs']) {
      tally('export');
      const csv = await get('export.csv', qs([['kind', kind], ['from', '2026-01-01'], ['to', '2026-12-31']]));
      expect(csv.status).toBe(200);
      expect(csv.text.split('\n').filter((l) => l.trim() !== '')).toHaveLength(1);
    }
  });

  it('a skater with no notes or runs: every skater view is empty', async () => {
    emptySkater = await addSkater(server.app, empty, 'Nieuwe Rijder');
    const cues = (await request(server.app).get(`/api/teams/${empty.teamId}/cues`).set(empty.auth).expect(200)).body as { id: string }[];
    const get = (path: string, query = '') => send(empty, empty.teamId, `skaters/${emptySkater.id}/${path}`, query);
    tally('skater weeks');
    expect((await get('weeks')).body).toMatchObject({ rows: [] });
    tally('cell');
    expect((await get('cells', qs([['cueId', cues[0].id], ['week', '2026-W40']]))).body).toMatchObject({ notes: [] });
    tally('laps');
    const laps = await get('laps');
    expect(laps.status).toBe(200);
    expect(laps.body).toMatchObject({ distanceM: null, runs: [], distances: [] });
    tally('laps');
    expect((await get('laps', qs([['distanceM', '1500']]))).body).toMatchObject({ distanceM: 1500, runs: [], bests: { finish: null } });
    tally('sheet');
    expect((await get('sheet', qs([['week', '2026-W40']]))).body).toMatchObject({ cues: [], notes: [], runs: [] });
    tally('skater follow-up');
    expect((await get('follow-up')).body).toMatchObject({ items: [], lapBasis: null });
    tally('runs by week');
    expect((await get('runs-by-week')).body).toMatchObject({ runs: [] });
  });
});
