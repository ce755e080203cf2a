/** The server's pino logger (JSON lines on stdout; level from LOG_LEVEL). */
import pino from 'pino';
import { env } from '../env';

export const logger = pino({ level: env().LOG_LEVEL, redact: ['req.headers.authorization', 'req.headers.cookie'] });
