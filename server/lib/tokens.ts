/**
 * Access tokens (short-lived JWTs, HS256 pinned, issuer, audience and expiry required) and the
 * opaque random tokens used for refresh cookies and e-mailed links (stored only as SHA-256
 * hashes). An access token names its sign-in (`sid`, the refresh-token family), so signing out,
 * a password reset or a replayed refresh token ends it before it expires (see lib/auth.ts).
 */
import { createHash, createSecretKey, randomBytes, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { z } from 'zod';
import { env } from '../env';
import { unauthorized } from './errors';

const ALGORITHM = 'HS256' as const;

/**
 * The secret as a key object, made once: given a string, jsonwebtoken first tries to read it as a
 * public key and fails before it falls back to a secret, on every request (a few per cent of a
 * sync's CPU).
 */
let key: { secret: string; object: KeyObject } | undefined;
function secretKey(secret: string): KeyObject {
  if (key?.secret !== secret) key = { secret, object: createSecretKey(Buffer.from(secret, 'utf8')) };
  return key.object;
}

export interface AccessClaims {
  userId: string;
  /** The sign-in (refresh-token family) the token was issued for. */
  familyId: string;
}

export function signAccessToken(userId: string, familyId: string): { token: string; expiresIn: number } {
  const { JWT_SECRET, JWT_ISSUER, JWT_AUDIENCE, ACCESS_TOKEN_TTL_SECONDS } = env();
  const token = jwt.sign({ sid: familyId }, secretKey(JWT_SECRET), {
    algorithm: ALGORITHM,
    subject: userId,
    issuer: JWT_ISSUER,
    audience: JWT_AUDIENCE,
    expiresIn: ACCESS_TOKEN_TTL_SECONDS,
  });
  return { token, expiresIn: ACCESS_TOKEN_TTL_SECONDS };
}

// Both ids reach SQL as uuid parameters: anything else must be a 401 here, not a cast error later.
const claimsSchema = z.object({ sub: z.uuid(), sid: z.uuid(), exp: z.number() });

/** The claims of a valid access token, or 401 (expired, no expiry, tampered, wrong audience, alg none...). */
export function verifyAccessToken(token: string): AccessClaims {
  const { JWT_SECRET, JWT_ISSUER, JWT_AUDIENCE } = env();
  let payload: string | jwt.JwtPayload;
  try {
    payload = jwt.verify(token, secretKey(JWT_SECRET), {
      algorithms: [ALGORITHM],
      issuer: JWT_ISSUER,
      audience: JWT_AUDIENCE,
    });
  } catch (error) {
    const expired = error instanceof jwt.TokenExpiredError;
    throw unauthorized(expired ? 'Your session has expired: sign in again' : 'Invalid access token');
  }
  // jsonwebtoken checks `exp` only when it is present: a token without one would never expire.
  const claims = claimsSchema.safeParse(payload);
  if (!claims.success) throw unauthorized('Invalid access token');
  return { userId: claims.data.sub, familyId: claims.data.sid };
}

/** A URL-safe random token (256 bits) for cookies and e-mailed links. */
export const randomToken = () => randomBytes(32).toString('base64url');

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');
