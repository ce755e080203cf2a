/** Accounts: sign-up (a user and their new team), sign-in, and password reset by e-mail. */
import type { DataSource } from 'typeorm';
import { v7 as uuidv7 } from 'uuid';
import type { SignInInput, SignUpInput } from '../../shared/schemas';
import { env } from '../env';
import { conflict, HttpError, unauthorized } from '../lib/errors';
import { logger } from '../lib/logger';
import { sendMail } from '../lib/mailer';
import { dummyPasswordHash, hashPassword, verifyPassword } from '../lib/passwords';
import { hashToken, randomToken } from '../lib/tokens';
import { Membership, PasswordReset, User } from '../entities';
import { insertDefaultCues } from './cues';
import { issueSession, revokeAllForUser, type IssuedSession } from './sessions';
import { isKnownTimeZone } from './team-settings';

export async function signUp(dataSource: DataSource, input: SignUpInput): Promise<IssuedSession> {
  const passwordHash = await hashPassword(input.password);
  // The browser's zone, when PostgreSQL can count in it; otherwise UTC, which the head coach can
  // change in the team's settings (a sign-up never fails over a zone the form did not show).
  const timeZone = input.timeZone && (await isKnownTimeZone(dataSource, input.timeZone)) ? input.timeZone : 'UTC';
  return dataSource.transaction(async (tx) => {
    const existing = await tx.getRepository(User).findOneBy({ email: input.email });
    if (existing) throw conflict('An account with this e-mail already exists: sign in instead', { email: 'An account with this e-mail already exists' });
    const user = tx.getRepository(User).create({
      id: uuidv7(),
      email: input.email,
      passwordHash,
      displayName: input.displayName,
    });
    await tx.getRepository(User).insert(user);
    const teamId = uuidv7();
    await tx.query(`INSERT INTO teams (id, name, time_zone) VALUES ($1, $2, $3)`, [teamId, input.teamName, timeZone]);
    await tx.getRepository(Membership).insert({ teamId, userId: user.id, role: 'head_coach', skaterId: null });
    // The team's sync counter (shared/SYNC.md, "Server order"); the cue library draws from it.
    await tx.query(`INSERT INTO team_counters (team_id, seq) VALUES ($1, 0)`, [teamId]);
    await insertDefaultCues(tx, teamId);
    return issueSession(tx, user);
  });
}

export async function signIn(dataSource: DataSource, input: SignInInput): Promise<IssuedSession> {
  const user = await dataSource.getRepository(User).findOneBy({ email: input.email });
  // Compare against a dummy hash when there is no such account, so timing does not tell.
  const ok = await verifyPassword(input.password, user?.passwordHash ?? (await dummyPasswordHash()));
  if (!user || !ok) throw unauthorized('E-mail or password is not right');
  return issueSession(dataSource, user);
}

/**
 * Always succeeds from the caller's view and answers in the same time whether or not the account
 * exists: the lookup, the token and the mail run after the reply has been decided.
 */
export function requestPasswordReset(dataSource: DataSource, email: string): void {
  void sendResetMail(dataSource, email).catch((error) => logger.error({ err: error }, 'password reset mail failed'));
}

async function sendResetMail(dataSource: DataSource, email: string): Promise<void> {
  const user = await dataSource.getRepository(User).findOneBy({ email });
  if (!user) return;
  const token = randomToken();
  await dataSource.getRepository(PasswordReset).insert({
    id: uuidv7(),
    userId: user.id,
    tokenHash: hashToken(token),
    expiresAt: new Date(Date.now() + env().PASSWORD_RESET_TTL_MINUTES * 60_000),
  });
  const link = `${env().PUBLIC_URL}/reset-password?token=${token}`;
  await sendMail({
    to: user.email,
    subject: 'Reset your Boardside password',
    text: [
      `Hello ${user.displayName},`,
      '',
      'Someone (hopefully you) asked to reset the password of your Boardside account.',
      `Open this link within ${env().PASSWORD_RESET_TTL_MINUTES} minutes to choose a new one:`,
      '',
      link,
      '',
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ].join('\n'),
  });
}

export async function confirmPasswordReset(dataSource: DataSource, token: string, password: string): Promise<IssuedSession> {
  const passwordHash = await hashPassword(password);
  return dataSource.transaction(async (tx) => {
    const [rows]: [{ user_id: string }[], number] = await tx.query(
      `UPDATE password_resets SET used_at = now()
        WHERE token_hash = $1 AND used_at IS NULL AND expires_at > now()
        RETURNING user_id`,
      [hashToken(token)],
    );
    if (rows.length === 0) {
      throw new HttpError(400, 'invalid_link', 'This reset link has expired or was already used: ask for a new one', {
        token: 'This reset link has expired or was already used',
      });
    }
    const users = tx.getRepository(User);
    await users.update({ id: rows[0].user_id }, { passwordHash, updatedAt: new Date() });
    await revokeAllForUser(tx, rows[0].user_id);
    // Any other reset link for this account dies with this one.
    await tx.query(`UPDATE password_resets SET used_at = now() WHERE user_id = $1 AND used_at IS NULL`, [rows[0].user_id]);
    return issueSession(tx, await users.findOneByOrFail({ id: rows[0].user_id }));
  });
}
