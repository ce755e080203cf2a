/** Errors that the one error handler turns into `{ error: { code, message, fields? } }`. */
import type { ZodType } from 'zod';
import { describeIssues } from '../../shared/schemas/errors';

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, fields?: Record<string, string>) =>
  new HttpError(400, 'validation', message, fields);
export const unauthorized = (message = 'Sign in to continue') => new HttpError(401, 'unauthorized', message);
export const forbidden = (message = 'You do not have access to this') => new HttpError(403, 'forbidden', message);
export const notFound = (message = 'Not found') => new HttpError(404, 'not_found', message);
export const conflict = (message: string, fields?: Record<string, string>) =>
  new HttpError(409, 'conflict', message, fields);

/** Parses untrusted input with a shared schema; a failure is a 400 naming each bad field. */
export function parse<T>(schema: ZodType<T>, input: unknown): T {
  const result = schema.safeParse(input ?? {});
  if (!result.success) {
    const { message, fields } = describeIssues(result.error.issues);
    throw badRequest(message, fields);
  }
  return result.data;
}
