/** The public side of invitations: preview a link's invitation and accept it. */
import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { DataSource } from 'typeorm';
import { invitationAcceptSchema, linkTokenSchema } from '../../shared/schemas';
import { env } from '../env';
import { HttpError, parse } from '../lib/errors';
import { acceptInvitation, previewInvitation } from '../services/invitations';
import { sendSession } from './auth';

export function invitationRoutes(dataSource: DataSource) {
  const router = Router();
  const limiter = rateLimit({
    windowMs: env().LOGIN_LIMIT_WINDOW_SECONDS * 1000,
    limit: env().LOGIN_LIMIT_PER_IP,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: () => {
      throw new HttpError(429, 'rate_limited', 'Too many attempts from this address: wait a few minutes and try again');
    },
  });

  router.get('/invitations/:token', limiter, async (req, res) => {
    const token = parse(linkTokenSchema, req.params.token);
    res.set('Cache-Control', 'no-store').json(await previewInvitation(dataSource, token));
  });

  router.post('/invitations/accept', limiter, async (req, res) => {
    const input = parse(invitationAcceptSchema, req.body);
    sendSession(res, await acceptInvitation(dataSource, input));
  });

  return router;
}
