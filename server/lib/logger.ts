/** The server's pino logger (JSON lines on stdout; level from LOG_LEVEL). */
import pino from 'pino';
import { env } from '../env';

// err.parameters: a failed TypeORM query carries its parameters (password and token hashes).
export const logger = pino({
  level: env().LOG_LEVEL,
  redact: ['req.headers.authorization', 'req.headers.cookie', 'err.parameters'],
});
