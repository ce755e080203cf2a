/**
 * Sign-in sessions: a short-lived access token plus a refresh token that rotates on every use.
 * Refresh tokens are random, stored only as hashes, and grouped in families (one per sign-in, a
 * `token_families` row); presenting a token that was already used (or revoked) revokes its whole
 * family, which ends a stolen copy's life too. Access tokens name their family, and a revoked
 * family's access tokens are refused at once (lib/auth.ts), not only when they expire.
 */
import type { DataSource, EntityManager } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import type { Membership as MembershipDto, Session } from '../../shared/schemas';
import { env } from '../env';
import { unauthorized } from '../lib/errors';
import { hashToken, randomToken, signAccessToken } from '../lib/tokens';
import { RefreshToken, TokenFamily, User } from '../entities';

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

/** Starts a new sign-in (refresh-token family), or continues `familyId`, and builds the session answer. */
export async function issueSession(
  db: DataSource | EntityManager,
  user: User,
  continuing?: string,
): Promise<IssuedSession> {
  const familyId = continuing ?? uuidv7();
  if (!continuing) await db.getRepository(TokenFamily).insert({ id: familyId, userId: user.id });
  const refreshToken = randomToken();
  const refreshExpiresAt = new Date(Date.now() + env().REFRESH_TOKEN_TTL_DAYS * 86_400_000);
  await db.getRepository(RefreshToken).insert({
    id: uuidv7(),
    userId: user.id,
    familyId,
    tokenHash: hashToken(refreshToken),
    expiresAt: refreshExpiresAt,
  });
  const access = signAccessToken(user.id, familyId);
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
    // Lock the sign-in: a sign-out or reset running now either ends it before this (and the
    // refresh is refused) or waits and then revokes the token issued here too.
    const live: unknown[] = await tx.query(
      `SELECT 1 FROM token_families WHERE id = $1 AND revoked_at IS NULL FOR UPDATE`,
      [row.familyId],
    );
    if (live.length === 0) return undefined;
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

/** Ends a sign-in: its access tokens are refused from now on, its refresh tokens too. */
async function revokeFamilyIn(db: DataSource | EntityManager, familyId: string) {
  // The family row first: it is what access tokens are checked against, and its lock orders this
  // after a refresh in flight, whose new token the second statement then sees.
  await db.query(`UPDATE token_families SET revoked_at = now() WHERE id = $1 AND revoked_at IS NULL`, [familyId]);
  await db.query(`UPDATE refresh_tokens SET revoked_at = now() WHERE family_id = $1 AND revoked_at IS NULL`, [familyId]);
}

export async function revokeByToken(dataSource: DataSource, presented: string | undefined) {
  if (!presented) return;
  const row = await dataSource.getRepository(RefreshToken).findOneBy({ tokenHash: hashToken(presented) });
  if (row) await revokeFamilyIn(dataSource.manager, row.familyId);
}

/** Ends the sign-in an access token belongs to (sign-out without the refresh cookie). */
export async function revokeFamily(dataSource: DataSource, familyId: string, userId: string) {
  const family = await dataSource.getRepository(TokenFamily).findOneBy({ id: familyId, userId });
  if (family) await revokeFamilyIn(dataSource, family.id);
}

/** Ends every sign-in of a user (password reset). */
export async function revokeAllForUser(db: DataSource | EntityManager, userId: string) {
  await db.query(`UPDATE token_families SET revoked_at = now() WHERE user_id = $1 AND revoked_at IS NULL`, [userId]);
  await db.query(`UPDATE refresh_tokens SET revoked_at = now() WHERE user_id = $1 AND revoked_at IS NULL`, [userId]);
}
