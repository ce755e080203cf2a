/**
 * Route guards. `requireUser` accepts only a valid bearer access token whose sign-in is still live
 * (one primary-key lookup in token_families: sign-out, password reset and refresh-token reuse end
 * it at once), and marks the answer `Cache-Control: no-store`; `requireTeamRole` then checks that
 * the caller belongs to the team named in the path (`:teamId`) with one of the given roles. A
 * non-member gets 404 so team ids reveal nothing; a member without the role gets 403.
 *
 * The guard finds the database in `app.locals.dataSource` (set by createApp), so routers use it
 * as plain middleware.
 */
import type { NextFunction, Request, Response } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import type { Role } from '../../shared/schemas';
import { Membership } from '../entities';
import { forbidden, notFound, unauthorized } from './errors';
import { verifyAccessToken, type AccessClaims } from './tokens';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      userId?: string;
      membership?: Membership;
    }
  }
}

/** The claims of the request's bearer token, or 401 (no header, malformed, invalid token). */
export function bearerClaims(req: Request): AccessClaims {
  const header = req.get('authorization') ?? '';
  const match = /^Bearer ([A-Za-z0-9._~+/=-]+)$/.exec(header);
  if (!match) throw unauthorized();
  return verifyAccessToken(match[1]);
}

export async function requireUser(req: Request, res: Response, next: NextFunction) {
  // Everything an authenticated route answers is someone's own data: no cache may keep it.
  res.set('Cache-Control', 'no-store');
  const claims = bearerClaims(req);
  const dataSource = req.app.locals.dataSource as DataSource | undefined;
  if (!dataSource) throw new Error('requireUser: app.locals.dataSource is not set (see createApp)');
  const live: unknown[] = await dataSource.query(
    `SELECT 1 FROM token_families WHERE id = $1 AND user_id = $2 AND revoked_at IS NULL`,
    [claims.familyId, claims.userId],
  );
  if (live.length === 0) throw unauthorized('This sign-in has ended: sign in again');
  req.userId = claims.userId;
  next();
}

const teamIdSchema = z.uuid();

export function requireTeamRole(dataSource: DataSource, ...roles: Role[]) {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const teamId = String(req.params.teamId ?? '');
    if (!teamIdSchema.safeParse(teamId).success) throw notFound('Team not found');
    const membership = await dataSource.getRepository(Membership).findOneBy({ teamId, userId: req.userId! });
    if (!membership) throw notFound('Team not found');
    if (!roles.includes(membership.role)) throw forbidden(`This needs the role: ${roles.join(' or ').replace(/_/g, ' ')}`);
    req.membership = membership;
    next();
  };
}
