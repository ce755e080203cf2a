/**
 * Sign-up, sign-in, refresh, sign-out and password reset. On the web the refresh token lives in
 * an HttpOnly cookie scoped to /api/auth; the access token is returned in the body and kept in
 * memory by the client.
 */
import { Router, type Request, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { DataSource } from 'typeorm';
import {
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  signInSchema,
  signUpSchema,
} from '../../shared/schemas';
import { env } from '../env';
import { bearerClaims, requireUser } from '../lib/auth';
import { HttpError, parse } from '../lib/errors';
import { tooMany } from '../lib/rate-limit';
import type { AccessClaims } from '../lib/tokens';
import { confirmPasswordReset, requestPasswordReset, signIn, signUp } from '../services/accounts';
import { membershipsOf, revokeByToken, revokeFamily, rotateSession, type IssuedSession } from '../services/sessions';
import { User } from '../entities';

export const REFRESH_COOKIE = 'boardside_refresh';
const COOKIE_PATH = '/api/auth';

/** The bearer token's claims, or nothing when it is not valid (sign-out then relies on the cookie). */
function validBearerOrNothing(req: Request): AccessClaims | undefined {
  try {
    return bearerClaims(req);
  } catch {
    return undefined;
  }
}

export function sendSession(res: Response, issued: IssuedSession, status = 200) {
  res.cookie(REFRESH_COOKIE, issued.refreshToken, {
    httpOnly: true,
    sameSite: 'strict',
    secure: env().PUBLIC_URL.startsWith('https:'),
    path: COOKIE_PATH,
    expires: issued.refreshExpiresAt,
  });
  res.set('Cache-Control', 'no-store').status(status).json(issued.session);
}

export function authRoutes(dataSource: DataSource) {
  const config = env();
  const router = Router();
  const windowMs = config.LOGIN_LIMIT_WINDOW_SECONDS * 1000;

  // Per client address: every attempt at the credential endpoints counts.
  const perIp = rateLimit({
    windowMs,
    limit: config.LOGIN_LIMIT_PER_IP,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooMany('Too many attempts from this address: wait a few minutes and try again'),
  });
  // Per (account, address): failed sign-ins against one e-mail from one address. Keyed by the
  // pair, so a stranger typing wrong passwords throttles only themselves, never the coach signing
  // in from elsewhere; guessing from many addresses still meets the per-address limit on each.
  const perAccount = rateLimit({
    windowMs,
    limit: config.LOGIN_LIMIT_PER_ACCOUNT,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => {
      const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
      return `account:${email}|ip:${ipKeyGenerator(req.ip ?? '')}`;
    },
    handler: tooMany('Too many failed sign-ins for this account from this address: wait a few minutes and try again'),
  });

  router.post('/auth/sign-up', perIp, async (req, res) => {
    const input = parse(signUpSchema, req.body);
    sendSession(res, await signUp(dataSource, input), 201);
  });

  router.post('/auth/sign-in', perIp, perAccount, async (req, res) => {
    const input = parse(signInSchema, req.body);
    sendSession(res, await signIn(dataSource, input));
  });

  router.post('/auth/refresh', async (req, res) => {
    try {
      sendSession(res, await rotateSession(dataSource, req.cookies?.[REFRESH_COOKIE]));
    } catch (error) {
      res.clearCookie(REFRESH_COOKIE, { path: COOKIE_PATH });
      throw error;
    }
  });

  // Ends the sign-in named by the refresh cookie and the one named by a valid access token (a
  // client without the cookie still ends its own sign-in). Neither is required: the answer is 204.
  router.post('/auth/sign-out', async (req, res) => {
    await revokeByToken(dataSource, req.cookies?.[REFRESH_COOKIE]);
    const claims = req.get('authorization') ? validBearerOrNothing(req) : undefined;
    if (claims) await revokeFamily(dataSource, claims.familyId, claims.userId);
    res.clearCookie(REFRESH_COOKIE, { path: COOKIE_PATH }).status(204).end();
  });

  router.post('/auth/password-reset', perIp, async (req, res) => {
    const { email } = parse(passwordResetRequestSchema, req.body);
    requestPasswordReset(dataSource, email);
    res.status(202).json({ ok: true });
  });

  router.post('/auth/password-reset/confirm', perIp, async (req, res) => {
    const { token, password } = parse(passwordResetConfirmSchema, req.body);
    sendSession(res, await confirmPasswordReset(dataSource, token, password));
  });

  router.get('/me', requireUser, async (req, res) => {
    const user = await dataSource.getRepository(User).findOneBy({ id: req.userId! });
    if (!user) throw new HttpError(401, 'unauthorized', 'This account no longer exists');
    res.json({
      user: { id: user.id, email: user.email, displayName: user.displayName },
      memberships: await membershipsOf(dataSource, user.id),
    });
  });

  return router;
}
