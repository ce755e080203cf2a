/**
 * Sign-in sessions: a short-lived access token plus a refresh token that rotates on every use.
 * Refresh tokens are random, stored only as hashes, and grouped in families; presenting a token
 * that was already used (or revoked) revokes its whole family, which ends a stolen copy's life too.
 */
import type { DataSource, EntityManager } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import type { Membership as MembershipDto, Session } from '../../shared/schemas';
import { env } from '../env';
import { unauthorized } from '../lib/errors';
import { hashToken, randomToken, signAccessToken } from '../lib/tokens';
import { RefreshToken, User } from '../entities';

export interface IssuedSession {
  session: Session;
  refreshToken: string;
  refreshExpiresAt: Date;
}

export async function membershipsOf(db: DataSource | EntityManager, userId: string): Promise<MembershipDto[]> {
  const rows: { team_id: string; team_name: string; role: MembershipDto['role']; skater_id: string | null }[] =
    await db.query(
      `SELECT m.team_id, t.name AS team_name, m.role, m.skater_id
         FROM memberships m JOIN teams t ON t.id = m.team_id
        WHERE m.user_id = $1
        ORDER BY m.created_at, t.name`,
      [userId],
    );
  return rows.map((r) => ({ teamId: r.team_id, teamName: r.team_name, role: r.role, skaterId: r.skater_id }));
}

/** Starts a new refresh-token family (or continues `familyId`) and builds the session answer. */
export async function issueSession(
  db: DataSource | EntityManager,
  user: User,
  familyId: string = uuidv7(),
): Promise<IssuedSession> {
  const refreshToken = randomToken();
  const refreshExpiresAt = new Date(Date.now() + env().REFRESH_TOKEN_TTL_DAYS * 86_400_000);
  await db.getRepository(RefreshToken).insert({
    id: uuidv7(),
    userId: user.id,
    familyId,
    tokenHash: hashToken(refreshToken),
    expiresAt: refreshExpiresAt,
  });
  const access = signAccessToken(user.id);
  return {
    refreshToken,
    refreshExpiresAt,
    session: {
      accessToken: access.token,
      expiresIn: access.expiresIn,
      user: { id: user.id, email: user.email, displayName: user.displayName },
      memberships: await membershipsOf(db, user.id),
    },
  };
}

/** Exchanges a refresh token for a new session, rotating it. Reuse revokes the family. */
export async function rotateSession(dataSource: DataSource, presented: string | undefined): Promise<IssuedSession> {
  if (!presented) throw unauthorized('Not signed in');
  const row = await dataSource.getRepository(RefreshToken).findOneBy({ tokenHash: hashToken(presented) });
  if (!row) throw unauthorized('Not signed in');
  if (row.usedAt || row.revokedAt) {
    await revokeFamilyIn(dataSource.manager, row.familyId);
    throw unauthorized('This sign-in was ended for safety: sign in again');
  }
  if (row.expiresAt.getTime() <= Date.now()) throw unauthorized('Your session has expired: sign in again');
  const issued = await dataSource.transaction(async (tx) => {
    // Claim the token atomically: of two concurrent uses only one can win; the other is a reuse.
    const [, claimed]: [unknown[], number] = await tx.query(
      `UPDATE refresh_tokens SET used_at = now() WHERE id = $1 AND used_at IS NULL AND revoked_at IS NULL RETURNING id`,
      [row.id],
    );
    if (claimed === 0) return undefined;
    const user = await tx.getRepository(User).findOneByOrFail({ id: row.userId });
    return issueSession(tx, user, row.familyId);
  });
  if (!issued) {
    await revokeFamilyIn(dataSource.manager, row.familyId);
    throw unauthorized('This sign-in was ended for safety: sign in again');
  }
  return issued;
}

async function revokeFamilyIn(db: EntityManager, familyId: string) {
  await db.query(`UPDATE refresh_tokens SET revoked_at = now() WHERE family_id = $1 AND revoked_at IS NULL`, [familyId]);
}

export async function revokeByToken(dataSource: DataSource, presented: string | undefined) {
  if (!presented) return;
  const row = await dataSource.getRepository(RefreshToken).findOneBy({ tokenHash: hashToken(presented) });
  if (row) await revokeFamilyIn(dataSource.manager, row.familyId);
}

export async function revokeAllForUser(db: DataSource | EntityManager, userId: string) {
  await db.query(`UPDATE refresh_tokens SET revoked_at = now() WHERE user_id = $1 AND revoked_at IS NULL`, [userId]);
}
