/**
 * Route guards. `requireUser` accepts only a valid bearer access token; `requireTeamRole` then
 * checks that the caller belongs to the team named in the path (`:teamId`) with one of the given
 * roles. A non-member gets 404 so team ids reveal nothing; a member without the role gets 403.
 */
import type { NextFunction, Request, Response } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import type { Role } from '../../shared/schemas';
import { Membership } from '../entities';
import { forbidden, notFound, unauthorized } from './errors';
import { verifyAccessToken } from './tokens';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      userId?: string;
      membership?: Membership;
    }
  }
}

export function requireUser(req: Request, _res: Response, next: NextFunction) {
  const header = req.get('authorization') ?? '';
  const match = /^Bearer ([A-Za-z0-9._~+/=-]+)$/.exec(header);
  if (!match) throw unauthorized();
  req.userId = verifyAccessToken(match[1]);
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
