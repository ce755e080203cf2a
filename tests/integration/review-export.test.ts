/**
 * The review's CSV export and weekly sheet (issue #10 §5), against the real PostgreSQL, with
 * notes and runs pushed through sync and another team's data in the same days. Every export is
 * read back with csv-parse and compared field by field; formula-like starts are quoted, numbers
 * are not; emoji, right-to-left text and NUL survive; the team's zone decides the day (23:30 on a
 * Sunday in New York is Monday in UTC); coaches only; every bad query a 400 naming its field;
 * pages of 5,000 rows, ties included, neither lose nor repeat a row.
 */
import request from 'supertest';
import { parse as parseCsv } from 'csv-parse/sync';
import { v7 as uuidv7 } from 'uuid';
import { csvWriter, EXPORT_PAGE, textCell } from '../../server/services/review/export';
import { weeklySheetSchema } from '../../shared/schemas/review-export';
import { expectError, startTestServer, type Account, type TestServer } from './helpers';
import { cueOf, makeReviewTeam, pushNotes, type ReviewTeam } from './review-helpers';
import { pushOk, userIdOf } from './sync-helpers';
import { crossingCreate, runCreate } from './support/clock-ops';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
let groupName: string;
const ids: Record<string, string> = {};

const ZONE = 'America/New_York';
// 2026-10-04 is a Sunday (2026-W40). 23:30 in New York (EDT, -04:00) is 03:30 on Monday in UTC.
const SUNDAY_LATE = '2026-10-05T03:30:00.000Z';
const FORMULAS = ['=HYPERLINK("http://example.invalid","open me")', '+1', '-', '@x', '-0.42'];
const WORLD = 'Knie dieper ⛸️🏅 — שלום, مرحبا "quoted", comma';

beforeAll(async () => {
  server = await startTestServer();
  team = await makeReviewTeam(server.app, server.dataSource, 'revexp', { timeZone: ZONE });
  other = await makeReviewTeam(server.app, server.dataSource, 'revexpother', { timeZone: ZONE });
  groupName = '-Juniors';
  const group = await request(server.app).post(`/api/teams/${team.teamId}/groups`).set(team.head.auth).send({ name: groupName }).expect(201);
  await request(server.app).patch(`/api/teams/${team.teamId}/skaters/${team.skaterA.id}`).set(team.head.auth).send({ groupId: group.body.id }).expect(200);

  const straight = cueOf(team, 'straight').id;
  const corner = cueOf(team, 'curve').id;
  const a = team.skaterA.id;
  const b = team.skaterB.id;
  const made = await pushNotes(server.app, team, team.headDevice, [
    { skaterId: a, cueId: straight, mark: 'needs_work', createdAt: SUNDAY_LATE, note: 'late on Sunday', noteShared: true },
    { skaterId: a, cueId: corner, mark: 'good', createdAt: '2026-09-30T14:05:09.000Z', note: WORLD, noteShared: true },
    { skaterId: a, cueId: straight, mark: 'needs_work', createdAt: '2026-09-29T13:00:00.000Z', note: 'private words', noteShared: false },
    { skaterId: a, cueId: straight, mark: 'good', createdAt: '2026-10-01T13:00:00.000Z', note: '', noteShared: false },
    ...FORMULAS.map((note, i) => ({ skaterId: b, cueId: straight, mark: 'needs_work' as const, createdAt: `2026-10-02T1${i}:00:00.000Z`, note, noteShared: true })),
  ]);
  [ids.late, ids.world, ids.privateA, ids.silentA] = made;
  // The coach's note the next morning (Monday 2026-W41 in New York).
  [ids.monday] = await pushNotes(server.app, team, team.coachDevice, [
    { skaterId: b, cueId: corner, mark: 'good', createdAt: '2026-10-05T12:00:00.000Z', note: 'Monday', noteShared: false },
  ]);
  // Another team's notes in the same days, for the same-named skaters.
  await pushNotes(server.app, other, other.headDevice, [
    { skaterId: other.skaterA.id, cueId: cueOf(other, 'straight').id, mark: 'good', createdAt: '2026-10-01T13:00:00.000Z', note: 'other team' },
  ]);

  // Runs: a finished 500 m (opener 100 m + one lap) 0.42 s under its target, and a stopped 1500 m.
  const dev = team.headDevice;
  ids.run500 = uuidv7();
  ids.heat = uuidv7();
  ids.run1500 = uuidv7();
  await pushOk(server.app, dev, team.teamId, [
    runCreate(dev, {
      id: ids.run500,
      heatId: ids.heat,
      skaterId: a,
      distanceM: 500,
      lane: 'inner',
      day: '2026-10-03',
      extra: { startedAt: '2026-10-03T14:00:00.000Z', createdAt: '2026-10-03T14:00:00.000Z', status: 'finished', targetMs: 39_150, note: '=SUM(A1)' },
    }),
    crossingCreate(dev, ids.run500, 10_450),
    crossingCreate(dev, ids.run500, 38_734),
    runCreate(dev, {
      id: ids.run1500,
      skaterId: a,
      distanceM: 1500,
      lane: 'outer',
      day: '2026-10-01',
      extra: { startedAt: '2026-10-01T12:00:00.000Z', createdAt: '2026-10-01T12:00:00.000Z', status: 'stopped', stopReason: 'fell in the corner' },
    }),
    crossingCreate(dev, ids.run1500, 27_000),
    crossingCreate(dev, ids.run1500, 56_500),
  ]);
  const odev = other.headDevice;
  const otherRun = uuidv7();
  await pushOk(server.app, odev, other.teamId, [
    runCreate(odev, { id: otherRun, skaterId: other.skaterA.id, distanceM: 500, extra: { startedAt: '2026-10-03T14:00:00.000Z', status: 'finished' } }),
    crossingCreate(odev, otherRun, 11_000),
  ]);
});

afterAll(() => server.close());

const exportCsv = (who: Account, query: Record<string, string>, teamId = team.teamId) =>
  request(server.app).get(`/api/teams/${teamId}/review/export.csv`).query(query).set(who.auth);

const rowsOf = (csv: string): Record<string, string>[] => parseCsv(csv, { columns: true, relax_column_count: false });

const week40 = { from: '2026-09-28', to: '2026-10-04' };

describe('observations export', () => {
  it('answers a CSV attachment with a header row and one row per note of the range, in the team zone', async () => {
    const res = await exportCsv(team.head, { kind: 'observations', ...week40 }).expect(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toBe('attachment; filename="boardside-observations-2026-09-28-2026-10-04.csv"');
    const csv = res.text;
    expect(csv.split('\r\n')[0]).toBe(
      'day,iso_week,local_time,skater,group,phase,cue,mark,note,note_shared,coach,session_title,session_day,observation_id,skater_id,cue_id,session_id',
    );
    const rows = rowsOf(csv);
    // 4 for A, 5 for B in week 40; Monday's note is week 41; the other team's never.
    expect(rows.filter((r) => r.skater_id === team.skaterA.id).map((r) => r.observation_id).sort()).toEqual([ids.late, ids.world, ids.privateA, ids.silentA].sort());
    expect(rows.filter((r) => r.skater_id === team.skaterB.id)).toHaveLength(5);
    expect(rows).toHaveLength(9);
    expect(rows.some((r) => r.note === 'other team' || r.observation_id === ids.monday)).toBe(false);
    // Ordered by time.
    const times = rows.map((r) => r.local_time);
    expect([...times].sort()).toEqual(times);
  });

  it('writes every field of a note as the coach made it, private notes included', async () => {
    const rows = rowsOf((await exportCsv(team.coach, { kind: 'observations', ...week40 }).expect(200)).text);
    const straight = cueOf(team, 'straight');
    const corner = cueOf(team, 'curve');
    const byId = new Map(rows.map((r) => [r.observation_id, r]));
    const base = { skater: 'Wietske Rondbaan', group: `'${groupName}`, coach: team.head.session.user.displayName, session_title: '', session_day: '2026-01-15', skater_id: team.skaterA.id, session_id: team.sessionId };
    expect(byId.get(ids.late)).toEqual({
      ...base,
      day: '2026-10-04',
      iso_week: '2026-W40',
      local_time: '2026-10-04T23:30:00-04:00',
      phase: 'straight',
      cue: straight.label,
      mark: 'needs work',
      note: 'late on Sunday',
      note_shared: 'yes',
      observation_id: ids.late,
      cue_id: straight.id,
    });
    expect(byId.get(ids.world)).toEqual({
      ...base,
      day: '2026-09-30',
      iso_week: '2026-W40',
      local_time: '2026-09-30T10:05:09-04:00',
      phase: 'curve',
      cue: corner.label,
      mark: 'good',
      note: WORLD,
      note_shared: 'yes',
      observation_id: ids.world,
      cue_id: corner.id,
    });
    expect(byId.get(ids.privateA)).toMatchObject({ note: 'private words', note_shared: 'no', local_time: '2026-09-29T09:00:00-04:00' });
    expect(byId.get(ids.silentA)).toMatchObject({ note: '', mark: 'good', day: '2026-10-01' });
  });

  it('puts a single quote before formula-like starts in text cells, and nowhere else', async () => {
    const res = await exportCsv(team.head, { kind: 'observations', ...week40, skaterIds: team.skaterB.id }).expect(200);
    const rows = rowsOf(res.text);
    expect(rows.map((r) => r.note)).toEqual(FORMULAS.map((f) => `'${f}`));
    expect(rows.every((r) => r.skater === 'Hidde Vlakijs' && r.group === '')).toBe(true);
    // The raw text: the quote sits inside the cell, so a spreadsheet shows text.
    expect(res.text).toContain(`"'=HYPERLINK(""http://example.invalid"",""open me"")"`);
    // Notes are trimmed on the way in, so a leading tab or return is checked on the cell itself.
    expect(textCell('\tindented')).toBe("'\tindented");
    expect(textCell('plain')).toBe('plain');
    expect(textCell('\rreturn')).toBe("'\rreturn");
    expect(textCell('a=b')).toBe('a=b');
  });

  it('counts a day in the team zone: 23:30 on Sunday is that Sunday, not Monday', async () => {
    const sunday = rowsOf((await exportCsv(team.head, { kind: 'observations', from: '2026-10-04', to: '2026-10-04' }).expect(200)).text);
    expect(sunday.map((r) => r.observation_id)).toEqual([ids.late]);
    const monday = rowsOf((await exportCsv(team.head, { kind: 'observations', from: '2026-10-05', to: '2026-10-05' }).expect(200)).text);
    expect(monday.map((r) => [r.observation_id, r.iso_week, r.coach])).toEqual([[ids.monday, '2026-W41', 'Marit Tweede']]);
  });

  it('keeps only the named skaters, and answers a header alone when nothing matches', async () => {
    const onlyA = rowsOf((await exportCsv(team.head, { kind: 'observations', ...week40, skaterIds: team.skaterA.id }).expect(200)).text);
    expect(new Set(onlyA.map((r) => r.skater_id))).toEqual(new Set([team.skaterA.id]));
    expect(onlyA).toHaveLength(4);
    const both = rowsOf((await exportCsv(team.head, { kind: 'observations', ...week40, skaterIds: `${team.skaterA.id},${team.skaterB.id}` }).expect(200)).text);
    expect(both).toHaveLength(9);
    const empty = await exportCsv(team.head, { kind: 'observations', from: '2025-01-01', to: '2025-01-31' }).expect(200);
    expect(empty.text).toBe('day,iso_week,local_time,skater,group,phase,cue,mark,note,note_shared,coach,session_title,session_day,observation_id,skater_id,cue_id,session_id\r\n');
  });

  it('round-trips NUL, emoji and right-to-left text through the writer', async () => {
    const writer = csvWriter(['a', 'b', 'n']);
    const chunks: string[] = [];
    writer.on('data', (c: Buffer) => chunks.push(c.toString('utf8')));
    const done = new Promise((resolve) => writer.on('end', resolve));
    const cells = ['nul\u0000inside', textCell('=🏅 שלום\r\nمرحبا')];
    writer.write([...cells, -0.42]);
    writer.end();
    await done;
    const [row] = parseCsv(chunks.join(''), { columns: true });
    expect(row).toEqual({ a: 'nul\u0000inside', b: "'=🏅 שלום\r\nمرحبا", n: '-0.42' });
  });
});

describe('runs export', () => {
  it('writes a run per row with its laps, finish, target and the gap as a plain number', async () => {
    const res = await exportCsv(team.head, { kind: 'runs', ...week40 }).expect(200);
    expect(res.headers['content-disposition']).toBe('attachment; filename="boardside-runs-2026-09-28-2026-10-04.csv"');
    expect(res.text.split('\r\n')[0]).toBe(
      'day,iso_week,started_local,skater,group,distance_m,track,lane,status,finish,finish_ms,lap_count,laps,target,target_ms,finish_minus_target_s,stop_reason,note,timed_by,run_id,heat_id,skater_id',
    );
    const rows = rowsOf(res.text);
    expect(rows.map((r) => r.run_id)).toEqual([ids.run1500, ids.run500]);
    const common = { skater: 'Wietske Rondbaan', group: `'${groupName}`, track: 'long', timed_by: team.head.session.user.displayName, skater_id: team.skaterA.id };
    expect(rows[1]).toEqual({
      ...common,
      day: '2026-10-03',
      iso_week: '2026-W40',
      started_local: '2026-10-03T10:00:00-04:00',
      distance_m: '500',
      lane: 'inner',
      status: 'finished',
      finish: '38.73',
      finish_ms: '38734',
      lap_count: '2',
      laps: '10.45 28.28',
      target: '39.15',
      target_ms: '39150',
      finish_minus_target_s: '-0.416',
      stop_reason: '',
      note: "'=SUM(A1)",
      run_id: ids.run500,
      heat_id: ids.heat,
    });
    expect(rows[0]).toMatchObject({
      ...common,
      distance_m: '1500',
      lane: 'outer',
      status: 'stopped',
      finish: '',
      finish_ms: '',
      lap_count: '2',
      laps: '27.00 29.50',
      target: '',
      target_ms: '',
      finish_minus_target_s: '',
      stop_reason: 'fell in the corner',
    });
    // The gap is a number cell: written bare, never quoted or prefixed.
    expect(res.text).toContain(',39.15,39150,-0.416,,');
  });
});

describe('who may export and print', () => {
  type Who = 'head' | 'coach' | 'skater' | 'guardian' | 'otherHead' | 'nobody';
  const as = (who: Who) => ({ head: team.head, coach: team.coach, skater: team.skaterAccount, guardian: team.guardian, otherHead: other.head, nobody: null })[who];
  const routes: Record<'csv' | 'sheet', () => [string, Record<string, string>]> = {
    csv: () => [`/api/teams/${team.teamId}/review/export.csv`, { kind: 'observations', ...week40 }],
    sheet: () => [`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/sheet`, { week: '2026-W40' }],
  };
  const cases: [Who, keyof typeof routes, number][] = (['csv', 'sheet'] as const).flatMap((route) => [
    ['head', route, 200],
    ['coach', route, 200],
    ['skater', route, 403],
    ['guardian', route, 403],
    ['otherHead', route, 404],
    ['nobody', route, 401],
  ]);
  it.each(cases)('%s on %s: %i', async (who, route, status) => {
    const [path, query] = routes[route]();
    const account = as(who);
    const req = request(server.app).get(path).query(query);
    const res = account ? await req.set(account.auth) : await req;
    expect(res.status).toBe(status);
    if (status !== 200) expectError(res, status);
  });

  it("refuses another team's skater: a 400 naming skaterIds for the export, 404 for the sheet", async () => {
    const res = await exportCsv(team.head, { kind: 'observations', ...week40, skaterIds: `${team.skaterA.id},${other.skaterA.id}` });
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.skaterIds).toContain(other.skaterA.id);
    const sheet = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${other.skaterA.id}/sheet`).query({ week: '2026-W40' }).set(team.head.auth);
    expectError(sheet, 404);
    const notUuid = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/nope/sheet`).query({ week: '2026-W40' }).set(team.head.auth);
    expectError(notUuid, 404);
  });
});

describe('bad queries', () => {
  const cases: [string, Record<string, string>, string][] = [
    ['no kind', { from: '2026-09-28', to: '2026-10-04' }, 'kind'],
    ['an unknown kind', { kind: 'laps', from: '2026-09-28', to: '2026-10-04' }, 'kind'],
    ['no from', { kind: 'runs', to: '2026-10-04' }, 'from'],
    ['no to', { kind: 'runs', from: '2026-10-04' }, 'to'],
    ['a from that is not a day', { kind: 'runs', from: '28/09/2026', to: '2026-10-04' }, 'from'],
    ['a to that does not exist', { kind: 'runs', from: '2026-09-28', to: '2026-02-30' }, 'to'],
    ['a day outside 2000-2100', { kind: 'runs', from: '1999-12-31', to: '2026-10-04' }, 'from'],
    ['from after to', { kind: 'runs', from: '2026-10-05', to: '2026-10-04' }, 'from'],
    ['more than 366 days', { kind: 'runs', from: '2025-01-01', to: '2026-01-02' }, 'to'],
    ['skaterIds that are not ids', { kind: 'runs', from: '2026-09-28', to: '2026-10-04', skaterIds: 'abc' }, 'skaterIds'],
    ['an empty skaterIds', { kind: 'runs', from: '2026-09-28', to: '2026-10-04', skaterIds: ' , ' }, 'skaterIds'],
    ['an unknown parameter', { kind: 'runs', from: '2026-09-28', to: '2026-10-04', format: 'xlsx' }, ''],
  ];
  it.each(cases)('%s is a 400 naming the field', async (_name, query, field) => {
    const res = await exportCsv(team.head, query);
    expectError(res, 400, 'validation');
    if (field) {
      expect(res.body.error.fields[field]).toEqual(expect.stringContaining(field === 'skaterIds' ? 'skater' : field));
    } else {
      expect(res.body.error.message).toMatch(/format/);
    }
  });

  it('a range of exactly 366 days is allowed', async () => {
    await exportCsv(team.head, { kind: 'runs', from: '2024-01-01', to: '2024-12-31' }).expect(200);
  });

  it.each([
    ['no week', {}],
    ['a week that does not exist', { week: '2025-W53' }],
    ['a day for a week', { week: '2026-10-04' }],
  ])('the sheet: %s is a 400 naming week', async (_name, query) => {
    const res = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/sheet`).query(query).set(team.head.auth);
    expectError(res, 400, 'validation');
    expect(res.body.error.fields.week).toMatch(/week/);
  });
});

describe('the weekly sheet', () => {
  it("holds the week's cue counts, only shared notes, and the runs with their laps", async () => {
    const res = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/sheet`).query({ week: '2026-W40' }).set(team.head.auth).expect(200);
    const sheet = weeklySheetSchema.parse(res.body);
    const straight = cueOf(team, 'straight');
    const corner = cueOf(team, 'curve');
    expect(sheet).toMatchObject({ timeZone: ZONE, week: '2026-W40', firstDay: '2026-09-28', lastDay: '2026-10-04' });
    expect(sheet.skater).toEqual({ id: team.skaterA.id, displayName: 'Wietske Rondbaan', groupName });
    // Straight: the private note and Sunday's late one need work, Thursday's is good.
    expect(sheet.cues).toEqual(
      expect.arrayContaining([
        { cueId: straight.id, phase: 'straight', label: straight.label, needsWork: 2, good: 1 },
        { cueId: corner.id, phase: 'curve', label: corner.label, needsWork: 0, good: 1 },
      ]),
    );
    expect(sheet.cues).toHaveLength(2);
    expect(sheet.notes.map((n) => n.note)).toEqual([WORLD, 'late on Sunday']);
    expect(sheet.notes[1]).toMatchObject({ day: '2026-10-04', time: '23:30', mark: 'needs_work', cueLabel: straight.label });
    expect(JSON.stringify(sheet)).not.toContain('private words');
    expect(sheet.runs).toEqual([
      { id: ids.run1500, day: '2026-10-01', time: '08:00', distanceM: 1500, track: 'long', status: 'stopped', finish: null, laps: ['27.00', '29.50'], target: null },
      { id: ids.run500, day: '2026-10-03', time: '10:00', distanceM: 500, track: 'long', status: 'finished', finish: '38.73', laps: ['10.45', '28.28'], target: '39.15' },
    ]);
  });

  it('an empty week is an empty sheet with the skater and the dates', async () => {
    const res = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterB.id}/sheet`).query({ week: '2027-W01' }).set(team.head.auth).expect(200);
    expect(res.body).toMatchObject({ week: '2027-W01', firstDay: '2027-01-04', lastDay: '2027-01-10', cues: [], notes: [], runs: [] });
  });
});

describe('many rows', () => {
  it(`reads in pages of ${EXPORT_PAGE}, ties of the same instant included, without losing or repeating a row`, async () => {
    const total = 2 * EXPORT_PAGE + 37;
    const cueId = cueOf(team, 'start').id;
    // Written straight into the table (pushing 10,000 notes through sync would be slow): every
    // 7 notes share one instant, so page edges fall inside ties.
    await server.dataSource.query(
      `INSERT INTO observations (team_id, id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by, field_hlc, server_seq)
       SELECT $1, gen_random_uuid(), $2, $3, $4, CASE WHEN i % 2 = 0 THEN 'good' ELSE 'needs_work' END, 'bulk ' || i, false,
              timestamptz '2027-03-01T12:00:00Z' + ((i / 7) * interval '1 second'), $5, '{}', 0
         FROM generate_series(1, $6::int) AS i`,
      [team.teamId, team.sessionId, team.skaterB.id, cueId, userIdOf(team.head), total],
    );
    const spy = jest.spyOn(server.dataSource, 'query');
    try {
      const res = await exportCsv(team.head, { kind: 'observations', from: '2027-03-01', to: '2027-03-01' }).expect(200);
      const rows = rowsOf(res.text);
      expect(rows).toHaveLength(total);
      expect(new Set(rows.map((r) => r.observation_id)).size).toBe(total);
      expect(new Set(rows.map((r) => r.note)).size).toBe(total);
      const pages = spy.mock.calls.filter(([sql]) => typeof sql === 'string' && sql.includes('FROM observations o') && sql.includes('LIMIT'));
      expect(pages).toHaveLength(3);
    } finally {
      spy.mockRestore();
    }
  });
});

describe('one run, one result (shared/timing.ts runResult) in the CSV, the weekly sheet and the lap chart', () => {
  it('a finished 500 m with a stray tap after the gun has no finish anywhere, and the chart calls it partial', async () => {
    const dev = team.headDevice;
    const b = team.skaterB.id;
    const stray = uuidv7();
    await pushOk(server.app, dev, team.teamId, [
      runCreate(dev, { id: stray, skaterId: b, distanceM: 500, day: '2026-10-20', extra: { startedAt: '2026-10-20T14:00:00.000Z', status: 'finished' } }),
      crossingCreate(dev, stray, 50),
      crossingCreate(dev, stray, 10_400),
      crossingCreate(dev, stray, 37_000),
    ]);
    const rows = rowsOf((await exportCsv(team.head, { kind: 'runs', from: '2026-10-19', to: '2026-10-25' }).expect(200)).text);
    expect(rows.map((r) => [r.run_id, r.finish, r.finish_ms, r.lap_count, r.laps])).toEqual([[stray, '', '', '3', '0.05 10.35 26.60']]);

    const sheet = await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${b}/sheet`).query({ week: '2026-W43' }).set(team.head.auth).expect(200);
    expect(sheet.body.runs).toEqual([expect.objectContaining({ id: stray, status: 'finished', finish: null, laps: ['0.05', '10.35', '26.60'] })]);

    const chart = await request(server.app)
      .get(`/api/teams/${team.teamId}/review/skaters/${b}/laps`)
      .query({ distanceM: '500', track: 'long', from: '2026-W43', to: '2026-W43' })
      .set(team.head.auth)
      .expect(200);
    expect(chart.body.runs).toEqual([expect.objectContaining({ id: stray, state: 'partial', finishMs: null, lapsMs: [50, 10_350, 26_600] })]);
    expect(chart.body.bests.finish).toBeNull();
  });
});
