/**
 * Invitations: a head coach invites a coach, a skater (linked to a skater profile) or a guardian
 * (linked to one skater) by e-mail. The link carries a random token stored only as a hash;
 * accepting it creates or reuses the account and adds the membership in one transaction.
 */
import type { DataSource } from 'typeorm';
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

export async function createInvitation(
  dataSource: DataSource,
  teamId: string,
  invitedBy: string,
  input: InvitationCreateInput,
): Promise<InvitationDto> {
  const skater = input.skaterId
    ? await dataSource.getRepository(Skater).findOneBy({ teamId, id: input.skaterId })
    : null;
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

  const token = randomToken();
  const row = dataSource.getRepository(Invitation).create({
    teamId,
    id: uuidv7(),
    email: input.email,
    role: input.role,
    skaterId: input.skaterId ?? null,
    tokenHash: hashToken(token),
    invitedBy,
    expiresAt: new Date(Date.now() + env().INVITATION_TTL_DAYS * 86_400_000),
    acceptedAt: null,
    revokedAt: null,
  });
  const [team, inviter] = await Promise.all([
    dataSource.getRepository(Team).findOneByOrFail({ id: teamId }),
    dataSource.getRepository(User).findOneByOrFail({ id: invitedBy }),
  ]);
  // Safeguarding: mail to a skater goes in copy to the guardians linked to that skater.
  const guardians: { email: string }[] =
    input.role === 'skater' && skater
      ? await dataSource.query(
          `SELECT u.email FROM memberships m JOIN users u ON u.id = m.user_id
            WHERE m.team_id = $1 AND m.role = 'guardian' AND m.skater_id = $2`,
          [teamId, skater.id],
        )
      : [];
  const link = `${env().PUBLIC_URL}/accept-invite?token=${token}`;
  const about =
    input.role === 'guardian' ? ` as the guardian of ${skater!.displayName}` : input.role === 'skater' ? ` as ${skater!.displayName}` : '';
  await dataSource.transaction(async (tx) => {
    // A newer invitation replaces any pending one for the same person and role.
    await tx.query(
      `UPDATE invitations SET expires_at = now()
        WHERE team_id = $1 AND email = $2 AND role = $3 AND accepted_at IS NULL AND expires_at > now()`,
      [teamId, input.email, input.role],
    );
    await tx.getRepository(Invitation).insert(row);
    // Sent inside the transaction: if the mail cannot go out, no invitation is left behind.
    await sendMail({
      to: input.email,
      cc: guardians.map((g) => g.email),
      subject: `${inviter.displayName} invites you to ${team.name} on Boardside`,
      text: [
        'Hello,',
        '',
        `${inviter.displayName} invites you to join ${team.name} on Boardside as ${roleLabels[input.role].toLowerCase()}${about}.`,
        'Boardside is the notebook your coaches keep at the rink: cues, lap times and targets.',
        '',
        `Open this link within ${env().INVITATION_TTL_DAYS} days to set your password and join:`,
        '',
        link,
        '',
        'If you did not expect this invitation, you can ignore this message.',
      ].join('\n'),
    });
  });
  const saved = await dataSource.getRepository(Invitation).findOneByOrFail({ teamId, id: row.id });
  return toInvitationDto(saved);
}

async function findPending(dataSource: DataSource, token: string): Promise<Invitation> {
  const row = await dataSource.getRepository(Invitation).findOneBy({ tokenHash: hashToken(token) });
  if (!row || row.acceptedAt || row.expiresAt.getTime() <= Date.now()) throw invalidLink();
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
      `UPDATE invitations SET accepted_at = now()
        WHERE team_id = $1 AND id = $2 AND accepted_at IS NULL AND expires_at > now() RETURNING id`,
      [pending.teamId, pending.id],
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
