/**
 * Team-scoped routes. Every route checks the caller's membership and role in the team named in
 * the path, and every query is bounded by that team id, so an id from another team finds nothing.
 */
import { Router, type Request } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import {
  groupCreateSchema,
  groupUpdateSchema,
  invitationCreateSchema,
  isCoachRole,
  skaterCreateSchema,
  skaterUpdateSchema,
  teamSettingsPatchSchema,
  type Member,
  type Skater as SkaterDto,
} from '../../shared/schemas';
import { requireTeamRole, requireUser } from '../lib/auth';
import { notFound, parse } from '../lib/errors';
import { Invitation, Skater, SkaterGroup } from '../entities';
import { listCues } from '../services/cues';
import { createInvitation, resendInvitation, revokeInvitation, toInvitationDto } from '../services/invitations';
import { createGroup, createSkater, removeMember, renameGroup, updateSkater } from '../services/squad';
import { readTeamSettings, updateTeamSettings } from '../services/team-settings';

/** A record id from the path: one that is not a UUID names nothing in this team (404, like an unknown one). */
function pathId(req: Request, name: string, what: string): string {
  const id = z.uuid().safeParse(req.params[name]);
  if (!id.success) throw notFound(`No such ${what} in this team`);
  return id.data;
}

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

  /** A new skater profile (head coach). A name the team has already (retired skaters too) is 409. */
  router.post('/teams/:teamId/skaters', headCoach, async (req, res) => {
    const input = parse(skaterCreateSchema, req.body);
    res.status(201).json(await createSkater(dataSource, req.membership!.teamId, input));
  });

  /** Rename, move to a group (groupId null: none) and retire or bring back (head coach). */
  router.patch('/teams/:teamId/skaters/:skaterId', headCoach, async (req, res) => {
    const skaterId = pathId(req, 'skaterId', 'skater');
    const input = parse(skaterUpdateSchema, req.body);
    res.json(await updateSkater(dataSource, req.membership!.teamId, skaterId, input));
  });

  /** A new group, after the team's last one (head coach). */
  router.post('/teams/:teamId/groups', headCoach, async (req, res) => {
    const input = parse(groupCreateSchema, req.body);
    res.status(201).json(await createGroup(dataSource, req.membership!.teamId, input));
  });

  router.patch('/teams/:teamId/groups/:groupId', headCoach, async (req, res) => {
    const groupId = pathId(req, 'groupId', 'group');
    const input = parse(groupUpdateSchema, req.body);
    res.json(await renameGroup(dataSource, req.membership!.teamId, groupId, input));
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

  /**
   * Removes a member (head coach): not yourself, not a head coach. Every sign-in of theirs ends at
   * once; a skater's profile stays, unlinked, and can be invited again.
   */
  router.delete('/teams/:teamId/members/:userId', headCoach, async (req, res) => {
    const userId = pathId(req, 'userId', 'member');
    await removeMember(dataSource, req.membership!.teamId, req.userId!, userId);
    res.status(204).end();
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

  /** Withdraws a pending invitation: its link stops working. An accepted one is 409. */
  router.delete('/teams/:teamId/invitations/:invitationId', headCoach, async (req, res) => {
    const invitationId = pathId(req, 'invitationId', 'invitation');
    res.json(await revokeInvitation(dataSource, req.membership!.teamId, invitationId));
  });

  /** Sends a pending, expired or withdrawn invitation again with a new link (the old one stops working). */
  router.post('/teams/:teamId/invitations/:invitationId/resend', headCoach, async (req, res) => {
    const invitationId = pathId(req, 'invitationId', 'invitation');
    res.json(await resendInvitation(dataSource, req.membership!.teamId, invitationId, req.userId!));
  });

  return router;
}
