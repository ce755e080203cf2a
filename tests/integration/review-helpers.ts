/**
 * Helpers for the review's integration tests (tests/integration/review-*.test.ts): a team whose
 * creation is moved into the past BEFORE its first push (push remembers when a team was made and
 * refuses notes from before), notes pushed through sync at chosen instants, and reading a review
 * route.
 */
import request from 'supertest';
import { v7 as uuidv7 } from 'uuid';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import type { Skater } from '../../shared/schemas';
import type { Op } from '../../shared/schemas/sync';
import { addSkater, inviteAndAccept, signUpCoach, type Account, type Coach } from './helpers';
import { device, pushOk, remove, sessionCreate, upsert, userIdOf, type Device } from './sync-helpers';

export interface ReviewCue {
  id: string;
  phase: string;
  label: string;
  sortOrder: number;
}

export interface ReviewTeam {
  teamId: string;
  head: Coach;
  headDevice: Device;
  coach: Account;
  coachDevice: Device;
  skaterA: Skater;
  skaterB: Skater;
  /** Signs in as skater A. */
  skaterAccount: Account;
  /** Guardian of skater B. */
  guardian: Account;
  cues: ReviewCue[];
  sessionId: string;
}

/** A team made "in 2020" (so notes of any later day push), with a head coach, and optionally the other roles. */
export async function makeReviewTeam(
  app: Express,
  dataSource: DataSource,
  label: string,
  options: { people?: boolean; timeZone?: string } = {},
): Promise<ReviewTeam> {
  const head = await signUpCoach(app, `${label}head`);
  const teamId = head.teamId;
  await dataSource.query(`UPDATE teams SET created_at = '2020-01-01T00:00:00Z' WHERE id = $1`, [teamId]);
  if (options.timeZone) {
    await request(app).patch(`/api/teams/${teamId}/settings`).set(head.auth).send({ timeZone: options.timeZone }).expect(200);
  }
  const skaterA = await addSkater(app, head, 'Wietske Rondbaan');
  const skaterB = await addSkater(app, head, 'Hidde Vlakijs');
  const people = options.people ?? true;
  const coach = people ? await inviteAndAccept(app, head, 'coach', { label: `${label}coach`, displayName: 'Marit Tweede' }) : head;
  const skaterAccount = people ? await inviteAndAccept(app, head, 'skater', { skaterId: skaterA.id, label: `${label}skater` }) : head;
  const guardian = people ? await inviteAndAccept(app, head, 'guardian', { skaterId: skaterB.id, label: `${label}guardian` }) : head;
  const cuesRes = await request(app).get(`/api/teams/${teamId}/cues`).set(head.auth).expect(200);
  const cues = cuesRes.body as ReviewCue[];
  const headDevice = device(head);
  const coachDevice = device(coach);
  const sessionId = uuidv7();
  await pushOk(app, headDevice, teamId, [sessionCreate(headDevice, sessionId, userIdOf(head))]);
  return { teamId, head, headDevice, coach, coachDevice, skaterA, skaterB, skaterAccount, guardian, cues, sessionId };
}

/** The first cue of a phase (the default library has several per phase). */
export const cueOf = (team: ReviewTeam, phase: string, index = 0): ReviewCue => {
  const cue = team.cues.filter((c) => c.phase === phase).sort((a, b) => a.sortOrder - b.sortOrder)[index];
  if (!cue) throw new Error(`no ${phase} cue ${index}`);
  return cue;
};

export interface NoteAt {
  id?: string;
  skaterId: string;
  cueId: string;
  mark: 'needs_work' | 'good';
  createdAt: string;
  note?: string;
  noteShared?: boolean;
}

/** A note made on `dev` at `createdAt`, as the device store writes it. */
export function noteOp(team: ReviewTeam, dev: Device, input: NoteAt): Op {
  return upsert(dev, 'observations', input.id ?? uuidv7(), {
    sessionId: team.sessionId,
    skaterId: input.skaterId,
    cueId: input.cueId,
    mark: input.mark,
    note: input.note ?? '',
    noteShared: input.noteShared ?? false,
    createdAt: input.createdAt,
    createdBy: userIdOf(dev.account),
  });
}

/** Pushes notes through sync and checks every op was applied; returns their ids. */
export async function pushNotes(app: Express, team: ReviewTeam, dev: Device, notes: NoteAt[]): Promise<string[]> {
  const ops = notes.map((n) => noteOp(team, dev, { ...n, id: n.id ?? uuidv7() }));
  const reply = await pushOk(app, dev, team.teamId, ops);
  const refused = reply.results.filter((r) => r.status !== 'applied');
  if (refused.length > 0) throw new Error(`push refused: ${JSON.stringify(refused)}`);
  return ops.map((op) => op.recordId);
}

/** Deletes notes through sync (tombstones). */
export async function deleteNotes(app: Express, team: ReviewTeam, dev: Device, ids: string[]): Promise<void> {
  const reply = await pushOk(app, dev, team.teamId, ids.map((id) => remove(dev, 'observations', id)));
  const refused = reply.results.filter((r) => r.status !== 'applied');
  if (refused.length > 0) throw new Error(`delete refused: ${JSON.stringify(refused)}`);
}

/** GET a review route of `teamId` as `who`. */
export const review = (app: Express, who: Account, teamId: string, path: string, query: Record<string, string> = {}) =>
  request(app).get(`/api/teams/${teamId}/review/${path}`).query(query).set(who.auth);
