/**
 * Builds the Express app: security headers, CORS allowlist, request logs, the JSON body limit,
 * the API routes, the built web app, and the one error handler. server/main.ts listens; tests
 * import createApp and drive it with supertest.
 */
import path from 'node:path';
import { existsSync } from 'node:fs';
import compression from 'compression';
import cookieParser from 'cookie-parser';
import cors from 'cors';
import express, { type NextFunction, type Request, type Response } from 'express';
import helmet from 'helmet';
import pinoHttp from 'pino-http';
import type { DataSource } from 'typeorm';
import { env } from './env';
import { HttpError } from './lib/errors';
import { logger } from './lib/logger';
import { authRoutes } from './routes/auth';
import { healthRoutes } from './routes/health';
import { invitationRoutes } from './routes/invitations';
import { reviewRoutes } from './routes/review';
import { exportRoutes } from './routes/review-export';
import { followUpRoutes } from './routes/review-follow-up';
import { lapTrendRoutes } from './routes/review-laps';
import { syncRoutes } from './routes/sync';
import { teamRoutes } from './routes/teams';

export function createApp(dataSource: DataSource) {
  const config = env();
  const app = express();
  app.disable('x-powered-by');
  // X-Forwarded-For names the client only behind a configured proxy (TRUST_PROXY); otherwise
  // anyone could forge a fresh address per request and escape the per-address limits.
  app.set('trust proxy', config.TRUST_PROXY);
  // requireUser (lib/auth.ts) checks each access token's sign-in here.
  app.locals.dataSource = dataSource;

  app.use(
    helmet({
      // Cross-origin isolation lets the web app's device store use SharedArrayBuffer.
      crossOriginOpenerPolicy: { policy: 'same-origin' },
      crossOriginEmbedderPolicy: { policy: 'require-corp' },
      crossOriginResourcePolicy: { policy: 'same-origin' },
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          // The device store runs SQLite compiled to WebAssembly.
          scriptSrc: ["'self'", "'wasm-unsafe-eval'"],
          // react-native-web injects its styles at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          workerSrc: ["'self'", 'blob:'],
          connectSrc: ["'self'"],
          mediaSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          upgradeInsecureRequests: null,
        },
      },
      strictTransportSecurity: config.PUBLIC_URL.startsWith('https:'),
    }),
  );

  const allowed = new Set([new URL(config.PUBLIC_URL).origin, ...config.CORS_ORIGINS]);
  app.use(
    '/api',
    cors({
      origin: (origin, callback) => callback(null, !origin || allowed.has(origin)),
      credentials: true,
      maxAge: 600,
    }),
  );

  // The web bundle and the SQLite wasm file compress to about a quarter of their size (full
  // effort: they are cached). API answers, sync pages above all, get the fastest level: most of
  // the gain for a fraction of the CPU on a busy sync.
  const apiCompression = compression({ level: 1 });
  const fileCompression = compression();
  app.use((req, res, next) => (req.path.startsWith('/api/') ? apiCompression : fileCompression)(req, res, next));
  // One short line per API request: method, path, status and time (no headers, no bodies).
  app.use(
    pinoHttp({
      logger,
      autoLogging: { ignore: (req) => !req.url?.startsWith('/api') },
      serializers: {
        req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
    }),
  );
  app.use('/api', express.json({ limit: config.JSON_BODY_LIMIT, strict: true }));
  app.use('/api', cookieParser());

  app.use('/api', healthRoutes(dataSource));
  app.use('/api', authRoutes(dataSource));
  app.use('/api', invitationRoutes(dataSource));
  app.use('/api', teamRoutes(dataSource));
  app.use('/api', reviewRoutes(dataSource));
  app.use('/api', lapTrendRoutes(dataSource));
  app.use('/api', followUpRoutes(dataSource));
  app.use('/api', exportRoutes(dataSource));
  app.use('/api', syncRoutes(dataSource));
  app.use('/api', (req) => {
    throw new HttpError(404, 'not_found', `No API route for ${req.method} ${req.path}`);
  });

  const dist = config.WEB_DIST ? path.resolve(config.WEB_DIST) : undefined;
  if (dist && existsSync(path.join(dist, 'index.html'))) {
    app.use(
      express.static(dist, {
        index: false,
        maxAge: '1h',
        // The service worker must be re-checked on every visit, or a new build would never reach the device.
        setHeaders: (res, file) => {
          if (file.endsWith(`${path.sep}sw.js`)) res.setHeader('Cache-Control', 'no-cache');
        },
      }),
    );
    // Every other path is a client route: the single-page app decides what to show.
    app.get('/{*splat}', (req, res) => {
      // A missing file (a name with an extension) is a 404, not the page: a browser asking for
      // /sw.js or an image must never be handed HTML.
      if (path.extname(req.path)) {
        res.status(404).type('text/plain').send('Not found');
        return;
      }
      res.set('Cache-Control', 'no-cache').sendFile(path.join(dist, 'index.html'));
    });
  }

  app.use(errorHandler);
  return app;
}

/** The one error handler: `{ error: { code, message, fields? } }`, never a stack trace. */
function errorHandler(error: unknown, req: Request, res: Response, _next: NextFunction) {
  if (res.headersSent) return;
  if (error instanceof HttpError) {
    res.status(error.status).json({ error: { code: error.code, message: error.message, fields: error.fields } });
    return;
  }
  const bodyError = error as { type?: string; status?: number; limit?: number };
  if (bodyError?.type === 'entity.too.large') {
    res.status(413).json({ error: { code: 'payload_too_large', message: `Request body is larger than ${env().JSON_BODY_LIMIT}` } });
    return;
  }
  if (bodyError?.type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'validation', message: 'Request body is not valid JSON' } });
    return;
  }
  if (bodyError?.type === 'encoding.unsupported' || bodyError?.type === 'charset.unsupported') {
    res.status(415).json({ error: { code: 'unsupported_media_type', message: 'Send the body as UTF-8 JSON' } });
    return;
  }
  if (typeof bodyError?.status === 'number' && bodyError.status >= 400 && bodyError.status < 500) {
    res.status(bodyError.status).json({ error: { code: 'bad_request', message: 'The request could not be read' } });
    return;
  }
  if ((error as { code?: string })?.code === '23505') {
    res.status(409).json({ error: { code: 'conflict', message: 'This exists already' } });
    return;
  }
  req.log?.error({ err: error }, 'unhandled error');
  const dbDown = isConnectionError(error);
  res.status(dbDown ? 503 : 500).json({
    error: dbDown
      ? { code: 'unavailable', message: 'A service the server needs (database or mail) is not reachable right now; try again shortly' }
      : { code: 'internal', message: 'Something went wrong on the server' },
  });
}

function isConnectionError(error: unknown): boolean {
  const code = (error as { code?: string })?.code ?? '';
  // Node socket codes, PostgreSQL's connection failures, and nodemailer's (mail server down).
  return ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', '57P01', '57P03', '08006', '08001', 'ESOCKET', 'ECONNECTION', 'ETIMEDOUT'].includes(code);
}
