/**
 * Who sees which review (issue #10 §6), with another team's notes in the same weeks: head coach
 * and coach see the whole team; a skater only their own weeks and cells (private notes' text
 * blank, as in the pull), no group or one-week view (403), another skater's id 404; a guardian
 * the same for the linked skater; another team's people and ids 404; no sign-in 401. One row per
 * role and route.
 */
import request from 'supertest';
import type { ReviewCell } from '../../shared/schemas/review';
import { expectError, startTestServer, type Account, type TestServer } from './helpers';
import { cueOf, makeReviewTeam, pushNotes, review, type ReviewTeam } from './review-helpers';
import { userIdOf } from './sync-helpers';

let server: TestServer;
let team: ReviewTeam;
let other: ReviewTeam;
let cue: string;

const range = { from: '2026-W40', to: '2026-W41' };

beforeAll(async () => {
  server = await startTestServer();
  team = await makeReviewTeam(server.app, server.dataSource, 'revacc');
  other = await makeReviewTeam(server.app, server.dataSource, 'revaccother');
  cue = cueOf(team, 'straight').id;
  const notes = (t: ReviewTeam, c: string, who: 'A' | 'B') => {
    const skaterId = who === 'A' ? t.skaterA.id : t.skaterB.id;
    return [
      { skaterId, cueId: c, mark: 'needs_work' as const, createdAt: '2026-09-29T10:00:00.000Z', note: `shared for ${who}`, noteShared: true },
      { skaterId, cueId: c, mark: 'good' as const, createdAt: '2026-09-30T10:00:00.000Z', note: `private for ${who}`, noteShared: false },
    ];
  };
  await pushNotes(server.app, team, team.headDevice, [...notes(team, cue, 'A'), ...notes(team, cue, 'B')]);
  const otherCue = cueOf(other, 'straight').id;
  await pushNotes(server.app, other, other.headDevice, [...notes(other, otherCue, 'A'), ...notes(other, otherCue, 'B')]);
});

afterAll(() => server.close());

type Who = 'head' | 'coach' | 'skater' | 'guardian' | 'otherHead' | 'otherSkater';
const account = (who: Who): Account =>
  ({
    head: team.head,
    coach: team.coach,
    skater: team.skaterAccount,
    guardian: team.guardian,
    otherHead: other.head,
    otherSkater: other.skaterAccount,
  })[who];

type Route = 'weeks A' | 'weeks B' | 'group all' | 'group none' | 'week' | 'cells A' | 'cells B';
const get = (who: Who, route: Route) => {
  const path = {
    'weeks A': [`skaters/${team.skaterA.id}/weeks`, range],
    'weeks B': [`skaters/${team.skaterB.id}/weeks`, range],
    'group all': ['groups/all/weeks', range],
    'group none': ['groups/none/weeks', range],
    week: ['week/2026-W40', {}],
    'cells A': [`skaters/${team.skaterA.id}/cells`, { cueId: cue, week: '2026-W40' }],
    'cells B': [`skaters/${team.skaterB.id}/cells`, { cueId: cue, week: '2026-W40' }],
  }[route] as [string, Record<string, string>];
  return review(server.app, account(who), team.teamId, path[0], path[1]);
};

const matrix: [Who, Route, number][] = [
  ...(['head', 'coach'] as const).flatMap((who) =>
    (['weeks A', 'weeks B', 'group all', 'group none', 'week', 'cells A', 'cells B'] as const).map((route): [Who, Route, number] => [who, route, 200]),
  ),
  ['skater', 'weeks A', 200],
  ['skater', 'cells A', 200],
  ['skater', 'weeks B', 404],
  ['skater', 'cells B', 404],
  ['skater', 'group all', 403],
  ['skater', 'group none', 403],
  ['skater', 'week', 403],
  ['guardian', 'weeks B', 200],
  ['guardian', 'cells B', 200],
  ['guardian', 'weeks A', 404],
  ['guardian', 'cells A', 404],
  ['guardian', 'group all', 403],
  ['guardian', 'group none', 403],
  ['guardian', 'week', 403],
  ...(['otherHead', 'otherSkater'] as const).flatMap((who) =>
    (['weeks A', 'weeks B', 'group all', 'group none', 'week', 'cells A', 'cells B'] as const).map((route): [Who, Route, number] => [who, route, 404]),
  ),
];

describe('roles x routes', () => {
  it.each(matrix)('%s on %s: %i', async (who, route, status) => {
    const res = await get(who, route);
    if (status === 200) {
      expect(res.status).toBe(200);
      // Only this team's notes: one needs work and one good per skater in 2026-W40.
      if (route.startsWith('weeks')) expect(res.body.rows).toEqual([expect.objectContaining({ cueId: cue, counts: [{ week: '2026-W40', needsWork: 1, good: 1 }] })]);
      if (route.startsWith('group')) {
        // Skaters A and B are in no group: 'all' and 'none' both sum the two.
        expect(res.body.rows).toEqual([expect.objectContaining({ cueId: cue, counts: [{ week: '2026-W40', needsWork: 2, good: 2 }] })]);
      }
      if (route === 'week') expect(res.body.cells).toHaveLength(2);
      if (route.startsWith('cells')) expect(res.body.notes).toHaveLength(2);
    } else {
      expectError(res, status);
    }
  });
});

describe('what a skater or guardian reads of the notes', () => {
  it.each([
    ['coach', 'cells A', 'A', true],
    ['skater', 'cells A', 'A', false],
    ['guardian', 'cells B', 'B', false],
    ['head', 'cells B', 'B', true],
  ] as const)('%s on %s (skater %s): private text shown = %s', async (who, route, skater, coachView) => {
    const body = (await get(who, route).expect(200)).body as ReviewCell;
    expect(body.notes.map((n) => [n.mark, n.noteShared, n.note])).toEqual([
      ['good', false, coachView ? `private for ${skater}` : ''],
      ['needs_work', true, `shared for ${skater}`],
    ]);
    // Coaches learn who wrote each note (its author and the head coach may change it); a skater
    // or guardian is not given coaches' user ids.
    expect(body.notes.map((n) => n.createdBy)).toEqual(coachView ? [userIdOf(team.head), userIdOf(team.head)] : ['', '']);
  });
});

describe('ids of another team', () => {
  it("another team's skater, group and cue are not found in this team", async () => {
    const otherGroup = await request(server.app).post(`/api/teams/${other.teamId}/groups`).set(other.head.auth).send({ name: 'Their group' }).expect(201);
    expectError(await review(server.app, team.head, team.teamId, `skaters/${other.skaterA.id}/weeks`, range), 404);
    expectError(await review(server.app, team.head, team.teamId, `skaters/${other.skaterA.id}/cells`, { cueId: cue, week: '2026-W40' }), 404);
    expectError(await review(server.app, team.head, team.teamId, `skaters/${team.skaterA.id}/cells`, { cueId: cueOf(other, 'straight').id, week: '2026-W40' }), 404);
    expectError(await review(server.app, team.head, team.teamId, `groups/${otherGroup.body.id}/weeks`, range), 404);
    expectError(await review(server.app, team.head, team.teamId, 'week/2026-W40', { groupId: otherGroup.body.id }), 404);
    // A skater of this team naming the other team's skater A (linked to someone else there) gets 404 too.
    expectError(await review(server.app, team.skaterAccount, team.teamId, `skaters/${other.skaterA.id}/weeks`, range), 404);
    // A path id that is not a UUID names nobody.
    expectError(await review(server.app, team.head, team.teamId, 'skaters/constructor/weeks', range), 404);
  });

  it('without a sign-in: 401', async () => {
    expectError(await request(server.app).get(`/api/teams/${team.teamId}/review/groups/all/weeks`), 401);
    expectError(await request(server.app).get(`/api/teams/${team.teamId}/review/skaters/${team.skaterA.id}/weeks`), 401);
  });
});
