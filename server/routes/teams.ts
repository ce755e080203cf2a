/**
 * Team-scoped routes. Every route checks the caller's membership and role in the team named in
 * the path, and every query is bounded by that team id, so an id from another team finds nothing.
 */
import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import { invitationCreateSchema, isCoachRole, skaterCreateSchema, teamSettingsPatchSchema, type Member, type Skater as SkaterDto } from '../../shared/schemas';
import { requireTeamRole, requireUser } from '../lib/auth';
import { conflict, notFound, parse } from '../lib/errors';
import { Invitation, Skater, SkaterGroup } from '../entities';
import { listCues } from '../services/cues';
import { nextSeqs } from '../services/sync/counter';
import { createInvitation, toInvitationDto } from '../services/invitations';
import { readTeamSettings, updateTeamSettings } from '../services/team-settings';
import { z } from 'zod';

const toSkaterDto = (row: Skater): SkaterDto => ({
  id: row.id,
  displayName: row.displayName,
  groupId: row.groupId,
  hasAccount: row.userId !== null,
  retired: row.retiredAt !== null,
});

export function teamRoutes(dataSource: DataSource) {
  const router = Router();
  const member = requireTeamRole(dataSource, 'head_coach', 'coach', 'skater', 'guardian');
  const coach = requireTeamRole(dataSource, 'head_coach', 'coach');
  const headCoach = requireTeamRole(dataSource, 'head_coach');

  router.use('/teams', requireUser);

  /** Groups and skater profiles: the whole squad for coaches, one skater for a skater or guardian. */
  router.get('/teams/:teamId/squad', member, async (req, res) => {
    const { teamId, role, skaterId } = req.membership!;
    const skaters = await dataSource.getRepository(Skater).find({
      where: isCoachRole(role) ? { teamId } : { teamId, id: skaterId! },
      order: { displayName: 'ASC' },
    });
    const groups = await dataSource.getRepository(SkaterGroup).find({ where: { teamId }, order: { sortOrder: 'ASC', name: 'ASC' } });
    const visibleGroups = isCoachRole(role) ? groups : groups.filter((g) => skaters.some((s) => s.groupId === g.id));
    res.json({
      groups: visibleGroups.map((g) => ({ id: g.id, name: g.name, sortOrder: g.sortOrder })),
      skaters: skaters.map(toSkaterDto),
    });
  });

  router.get('/teams/:teamId/skaters/:skaterId', member, async (req, res) => {
    const { teamId, role, skaterId } = req.membership!;
    const id = z.uuid().safeParse(req.params.skaterId);
    // Skaters and guardians may read only their own (linked) profile; others look like absent ones.
    if (!id.success || (!isCoachRole(role) && id.data !== skaterId)) throw notFound('No such skater in this team');
    const row = await dataSource.getRepository(Skater).findOneBy({ teamId, id: id.data });
    if (!row) throw notFound('No such skater in this team');
    res.json(toSkaterDto(row));
  });

  router.post('/teams/:teamId/skaters', headCoach, async (req, res) => {
    const { teamId } = req.membership!;
    const input = parse(skaterCreateSchema, req.body);
    if (input.groupId && !(await dataSource.getRepository(SkaterGroup).existsBy({ teamId, id: input.groupId }))) {
      throw notFound('No such group in this team');
    }
    const id = input.id ?? uuidv7();
    if (await dataSource.getRepository(Skater).existsBy({ teamId, id })) throw conflict('A skater with this id exists already');
    const row = { teamId, id, displayName: input.displayName, groupId: input.groupId ?? null, userId: null, retiredAt: null };
    await dataSource.transaction(async (tx) => {
      // Stamped from the team's sync counter in the same transaction, so pulls see the profile.
      const serverSeq = await nextSeqs(tx, teamId, 1);
      await tx.query(
        `INSERT INTO skaters (team_id, id, display_name, group_id, user_id, server_seq) VALUES ($1, $2, $3, $4, NULL, $5)`,
        [teamId, id, row.displayName, row.groupId, serverSeq],
      );
    });
    res.status(201).json(toSkaterDto(row as Skater));
  });

  /** The cue library (archived cues included, flagged): coaches record with it; skaters read cues by it. */
  router.get('/teams/:teamId/cues', member, async (req, res) => {
    res.json(await listCues(dataSource, req.membership!.teamId));
  });

  /** The team's settings: coaches read them (the board's defaults), the head coach changes them. */
  router.get('/teams/:teamId/settings', coach, async (req, res) => {
    res.json(await readTeamSettings(dataSource, req.membership!.teamId));
  });

  router.patch('/teams/:teamId/settings', headCoach, async (req, res) => {
    const patch = parse(teamSettingsPatchSchema, req.body);
    res.json(await updateTeamSettings(dataSource, req.membership!.teamId, patch));
  });

  router.get('/teams/:teamId/members', coach, async (req, res) => {
    const rows: { user_id: string; display_name: string; email: string; role: Member['role']; skater_id: string | null }[] =
      await dataSource.query(
        `SELECT m.user_id, u.display_name, u.email, m.role, m.skater_id
           FROM memberships m JOIN users u ON u.id = m.user_id
          WHERE m.team_id = $1 ORDER BY m.role, u.display_name`,
        [req.membership!.teamId],
      );
    const members: Member[] = rows.map((r) => ({
      userId: r.user_id,
      displayName: r.display_name,
      email: r.email,
      role: r.role,
      skaterId: r.skater_id,
    }));
    res.json(members);
  });

  router.get('/teams/:teamId/invitations', headCoach, async (req, res) => {
    const rows = await dataSource.getRepository(Invitation).find({
      where: { teamId: req.membership!.teamId },
      order: { createdAt: 'DESC' },
      take: 200,
    });
    res.json(rows.map(toInvitationDto));
  });

  router.post('/teams/:teamId/invitations', headCoach, async (req, res) => {
    const input = parse(invitationCreateSchema, req.body);
    res.status(201).json(await createInvitation(dataSource, req.membership!.teamId, req.userId!, input));
  });

  return router;
}
