/**
 * Rate limits that answer with the one error shape (429 `rate_limited` and a message saying what
 * to do). The sign-in limits live with their routes (routes/auth.ts); the sync limit counts per
 * signed-in user, so a club's devices behind one address do not share a budget and a user cannot
 * escape it by changing address.
 */
import type { Request, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { env } from '../env';
import { HttpError } from './errors';

export function tooMany(message: string) {
  return (_req: Request, _res: Response) => {
    throw new HttpError(429, 'rate_limited', message);
  };
}

/** Push and pull together, per user; mount after requireUser (it keys on req.userId). */
export function syncLimit() {
  const { SYNC_LIMIT_PER_USER, SYNC_LIMIT_WINDOW_SECONDS } = env();
  return rateLimit({
    windowMs: SYNC_LIMIT_WINDOW_SECONDS * 1000,
    limit: SYNC_LIMIT_PER_USER,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `user:${req.userId}`,
    handler: tooMany('Too many sync requests for this account in a short time: wait a minute, then sync again'),
  });
}
