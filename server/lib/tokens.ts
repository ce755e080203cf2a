/**
 * Access tokens (short-lived JWTs, HS256 pinned, issuer and audience checked) and the opaque
 * random tokens used for refresh cookies and e-mailed links (stored only as SHA-256 hashes).
 */
import { createHash, randomBytes } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { env } from '../env';
import { unauthorized } from './errors';

const ALGORITHM = 'HS256' as const;

export function signAccessToken(userId: string): { token: string; expiresIn: number } {
  const { JWT_SECRET, JWT_ISSUER, JWT_AUDIENCE, ACCESS_TOKEN_TTL_SECONDS } = env();
  const token = jwt.sign({}, JWT_SECRET, {
    algorithm: ALGORITHM,
    subject: userId,
    issuer: JWT_ISSUER,
    audience: JWT_AUDIENCE,
    expiresIn: ACCESS_TOKEN_TTL_SECONDS,
  });
  return { token, expiresIn: ACCESS_TOKEN_TTL_SECONDS };
}

/** Returns the user id of a valid access token, or throws 401 (expired, tampered, wrong audience, alg none...). */
export function verifyAccessToken(token: string): string {
  const { JWT_SECRET, JWT_ISSUER, JWT_AUDIENCE } = env();
  try {
    const payload = jwt.verify(token, JWT_SECRET, {
      algorithms: [ALGORITHM],
      issuer: JWT_ISSUER,
      audience: JWT_AUDIENCE,
    });
    if (typeof payload === 'string' || typeof payload.sub !== 'string') throw new Error('no subject');
    return payload.sub;
  } catch (error) {
    const expired = error instanceof jwt.TokenExpiredError;
    throw unauthorized(expired ? 'Your session has expired: sign in again' : 'Invalid access token');
  }
}

/** A URL-safe random token (256 bits) for cookies and e-mailed links. */
export const randomToken = () => randomBytes(32).toString('base64url');

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');
