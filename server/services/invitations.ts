/**
 * Invitations: a head coach invites a coach, a skater (linked to a skater profile) or a guardian
 * (linked to one skater) by e-mail. The link carries a random token stored only as a hash;
 * accepting it creates or reuses the account and adds the membership in one transaction. The head
 * coach may withdraw a pending invitation (revoked_at: the link fails like an expired one) or send
 * it again (a fresh token on the same row: the old link stops working).
 */
import type { DataSource, EntityManager } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import type {
  Invitation as InvitationDto,
  InvitationAcceptInput,
  InvitationCreateInput,
  InvitationPreview,
} from '../../shared/schemas';
import { roleLabels } from '../../shared/schemas';
import { env } from '../env';
import { badRequest, conflict, HttpError, notFound, unauthorized } from '../lib/errors';
import { sendMail } from '../lib/mailer';
import { hashPassword, verifyPassword } from '../lib/passwords';
import { hashToken, randomToken } from '../lib/tokens';
import { Invitation, Membership, Skater, Team, User } from '../entities';
import { issueSession, type IssuedSession } from './sessions';
import { nextSeqs } from './sync/counter';

export const toInvitationDto = (row: Invitation): InvitationDto => ({
  id: row.id,
  email: row.email,
  role: row.role,
  skaterId: row.skaterId,
  createdAt: row.createdAt.toISOString(),
  expiresAt: row.expiresAt.toISOString(),
  acceptedAt: row.acceptedAt ? row.acceptedAt.toISOString() : null,
  revokedAt: row.revokedAt ? row.revokedAt.toISOString() : null,
});

const invalidLink = () =>
  new HttpError(404, 'invalid_link', 'This invitation is no longer valid: ask your coach for a new one');

/** The invited person's skater profile (for a skater or guardian), after the checks create and resend share. */
async function checkInvitable(
  dataSource: DataSource,
  teamId: string,
  input: { email: string; role: InvitationDto['role']; skaterId: string | null },
): Promise<Skater | null> {
  const skater = input.skaterId ? await dataSource.getRepository(Skater).findOneBy({ teamId, id: input.skaterId }) : null;
  if (input.skaterId && !skater) throw notFound('No such skater in this team');
  if (input.role === 'skater' && skater?.userId) {
    throw conflict('This skater profile is already linked to an account', { skaterId: 'Already linked to an account' });
  }
  const existingMember: unknown[] = await dataSource.query(
    `SELECT 1 FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.team_id = $1 AND u.email = $2`,
    [teamId, input.email],
  );
  if (existingMember.length > 0) {
    throw conflict('This person is already a member of the team', { email: 'Already a member of the team' });
  }
  return skater;
}

/**
 * Mails the invitation link (the first time and when the head coach sends it again). Mail to a
 * skater goes in copy to the guardians linked to that skater (safeguarding). Called inside the
 * transaction that stores the token: if the mail cannot go out, the link is not stored either.
 */
async function mailInvitation(
  db: EntityManager,
  invitation: { teamId: string; invitedBy: string; email: string; role: InvitationDto['role'] },
  skater: Skater | null,
  token: string,
) {
  const [team, inviter] = await Promise.all([
    db.getRepository(Team).findOneByOrFail({ id: invitation.teamId }),
    db.getRepository(User).findOneByOrFail({ id: invitation.invitedBy }),
  ]);
  const guardians: { email: string }[] =
    invitation.role === 'skater' && skater
      ? await db.query(
          `SELECT u.email FROM memberships m JOIN users u ON u.id = m.user_id
            WHERE m.team_id = $1 AND m.role = 'guardian' AND m.skater_id = $2`,
          [invitation.teamId, skater.id],
        )
      : [];
  const link = `${env().PUBLIC_URL}/accept-invite?token=${token}`;
  const about =
    invitation.role === 'guardian' ? ` as the guardian of ${skater!.displayName}` : invitation.role === 'skater' ? ` as ${skater!.displayName}` : '';
  await sendMail({
    to: invitation.email,
    cc: guardians.map((g) => g.email),
    subject: `${inviter.displayName} invites you to ${team.name} on Boardside`,
    text: [
      'Hello,',
      '',
      `${inviter.displayName} invites you to join ${team.name} on Boardside as ${roleLabels[invitation.role].toLowerCase()}${about}.`,
      'Boardside is the notebook your coaches keep at the rink: cues, lap times and targets.',
      '',
      `Open this link within ${env().INVITATION_TTL_DAYS} days to set your password and join:`,
      '',
      link,
      '',
      'If you did not expect this invitation, you can ignore this message.',
    ].join('\n'),
  });
}

/** A newer invitation replaces any pending one for the same person and role (but `keep`). */
async function expireOthers(db: EntityManager, teamId: string, email: string, role: string, keep: string) {
  await db.query(
    `UPDATE invitations SET expires_at = now()
      WHERE team_id = $1 AND email = $2 AND role = $3 AND id <> $4
        AND accepted_at IS NULL AND revoked_at IS NULL AND expires_at > now()`,
    [teamId, email, role, keep],
  );
}

const newExpiry = () => new Date(Date.now() + env().INVITATION_TTL_DAYS * 86_400_000);

export async function createInvitation(
  dataSource: DataSource,
  teamId: string,
  invitedBy: string,
  input: InvitationCreateInput,
): Promise<InvitationDto> {
  const skater = await checkInvitable(dataSource, teamId, { email: input.email, role: input.role, skaterId: input.skaterId ?? null });
  const token = randomToken();
  const row = dataSource.getRepository(Invitation).create({
    teamId,
    id: uuidv7(),
    email: input.email,
    role: input.role,
    skaterId: input.skaterId ?? null,
    tokenHash: hashToken(token),
    invitedBy,
    expiresAt: newExpiry(),
    acceptedAt: null,
    revokedAt: null,
  });
  await dataSource.transaction(async (tx) => {
    await expireOthers(tx, teamId, input.email, input.role, row.id);
    await tx.getRepository(Invitation).insert(row);
    await mailInvitation(tx, row, skater, token);
  });
  const saved = await dataSource.getRepository(Invitation).findOneByOrFail({ teamId, id: row.id });
  return toInvitationDto(saved);
}

const acceptedAlready = () =>
  conflict('This invitation has been accepted already: the person is in the staff list (remove them there if needed)');

/**
 * Withdraws a pending invitation: its link then fails like an expired one. Withdrawing one that
 * is withdrawn already answers it as it is.
 */
export async function revokeInvitation(dataSource: DataSource, teamId: string, invitationId: string): Promise<InvitationDto> {
  const row = await dataSource.getRepository(Invitation).findOneBy({ teamId, id: invitationId });
  if (!row) throw notFound('No such invitation in this team');
  const [, changed]: [unknown[], number] = await dataSource.query(
    `UPDATE invitations SET revoked_at = coalesce(revoked_at, now()) WHERE team_id = $1 AND id = $2 AND accepted_at IS NULL`,
    [teamId, invitationId],
  );
  if (changed === 0) throw acceptedAlready();
  return toInvitationDto(await dataSource.getRepository(Invitation).findOneByOrFail({ teamId, id: invitationId }));
}

/**
 * Sends an invitation again, on the same row (its id stays, so the head coach's list keeps it in
 * place): a fresh token (the old link stops working), a fresh expiry, withdrawn no longer, from
 * the head coach who sends it now, with the same mail as the first time.
 */
export async function resendInvitation(dataSource: DataSource, teamId: string, invitationId: string, sentBy: string): Promise<InvitationDto> {
  const row = await dataSource.getRepository(Invitation).findOneBy({ teamId, id: invitationId });
  if (!row) throw notFound('No such invitation in this team');
  if (row.acceptedAt) throw acceptedAlready();
  const skater = await checkInvitable(dataSource, teamId, { email: row.email, role: row.role, skaterId: row.skaterId });
  const token = randomToken();
  await dataSource.transaction(async (tx) => {
    const [, changed]: [unknown[], number] = await tx.query(
      `UPDATE invitations SET token_hash = $3, expires_at = $4, revoked_at = NULL, invited_by = $5
        WHERE team_id = $1 AND id = $2 AND accepted_at IS NULL`,
      [teamId, invitationId, hashToken(token), newExpiry(), sentBy],
    );
    if (changed === 0) throw acceptedAlready();
    await expireOthers(tx, teamId, row.email, row.role, row.id);
    await mailInvitation(tx, { teamId, invitedBy: sentBy, email: row.email, role: row.role }, skater, token);
  });
  return toInvitationDto(await dataSource.getRepository(Invitation).findOneByOrFail({ teamId, id: invitationId }));
}

async function findPending(dataSource: DataSource, token: string): Promise<Invitation> {
  const row = await dataSource.getRepository(Invitation).findOneBy({ tokenHash: hashToken(token) });
  if (!row || row.acceptedAt || row.revokedAt || row.expiresAt.getTime() <= Date.now()) throw invalidLink();
  return row;
}

export async function previewInvitation(dataSource: DataSource, token: string): Promise<InvitationPreview> {
  const row = await findPending(dataSource, token);
  const [team, inviter, skater, account] = await Promise.all([
    dataSource.getRepository(Team).findOneByOrFail({ id: row.teamId }),
    dataSource.getRepository(User).findOneByOrFail({ id: row.invitedBy }),
    row.skaterId ? dataSource.getRepository(Skater).findOneBy({ teamId: row.teamId, id: row.skaterId }) : null,
    dataSource.getRepository(User).findOneBy({ email: row.email }),
  ]);
  return {
    teamName: team.name,
    role: row.role,
    email: row.email,
    skaterName: skater?.displayName ?? null,
    invitedBy: inviter.displayName,
    existingAccount: account !== null,
  };
}

export async function acceptInvitation(dataSource: DataSource, input: InvitationAcceptInput): Promise<IssuedSession> {
  const pending = await findPending(dataSource, input.token);
  const existing = await dataSource.getRepository(User).findOneBy({ email: pending.email });
  if (existing && !(await verifyPassword(input.password, existing.passwordHash))) {
    throw unauthorized('An account with this e-mail exists already: enter its current password to join');
  }
  if (!existing && !input.displayName) throw badRequest('displayName: Name is required', { displayName: 'Name is required' });
  const passwordHash = existing ? existing.passwordHash : await hashPassword(input.password);

  return dataSource.transaction(async (tx) => {
    // Claim the invitation first so a double submit cannot join twice.
    const [claimed]: [Invitation[], number] = await tx.query(
      // The token too: a link sent again since this one was read has replaced it.
      `UPDATE invitations SET accepted_at = now()
        WHERE team_id = $1 AND id = $2 AND token_hash = $3
          AND accepted_at IS NULL AND revoked_at IS NULL AND expires_at > now() RETURNING id`,
      [pending.teamId, pending.id, pending.tokenHash],
    );
    if (claimed.length === 0) throw invalidLink();

    const users = tx.getRepository(User);
    let user = existing;
    if (!user) {
      user = users.create({ id: uuidv7(), email: pending.email, passwordHash, displayName: input.displayName! });
      await users.insert(user);
    }
    const member = await tx.getRepository(Membership).findOneBy({ teamId: pending.teamId, userId: user.id });
    if (member) throw conflict('You are already a member of this team: sign in instead');
    if (pending.role === 'skater') {
      // hasAccount changes: the profile gets a new server_seq so devices pull it.
      const seq = await nextSeqs(tx, pending.teamId, 1);
      const [, linked]: [unknown[], number] = await tx.query(
        `UPDATE skaters SET user_id = $3, updated_at = now(), server_seq = $4
          WHERE team_id = $1 AND id = $2 AND user_id IS NULL`,
        [pending.teamId, pending.skaterId, user.id, seq],
      );
      if (linked === 0) throw conflict('This skater profile is already linked to another account');
    }
    await tx.getRepository(Membership).insert({
      teamId: pending.teamId,
      userId: user.id,
      role: pending.role,
      skaterId: pending.skaterId,
    });
    return issueSession(tx, user);
  });
}
