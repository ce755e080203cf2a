/**
 * Ids from a review route's path, parsed once for every review route (review.ts, review-export.ts,
 * review-follow-up.ts, review-laps.ts).
 */
import type { Request } from 'express';
import { z } from 'zod';
import { notFound } from '../../lib/errors';

/** A skater id from the path: one that is not a UUID names nobody in this team (404). */
export function skaterIdOf(req: Request): string {
  const id = z.uuid().safeParse(req.params.skaterId);
  if (!id.success) throw notFound('No such skater in this team');
  // Lower case, as the database writes it: a skater's own id in upper case is still their own.
  return id.data.toLowerCase();
}
