/**
 * The server process: validate the environment, connect to PostgreSQL, run pending migrations,
 * listen, and shut down gracefully on SIGINT/SIGTERM (finish open requests, close the pool).
 */
import { env, EnvError } from './env';

async function main() {
  let config;
  try {
    config = env();
  } catch (error) {
    if (error instanceof EnvError) {
      console.error(error.message);
      process.exit(1);
    }
    throw error;
  }
  const { createDataSource } = await import('./data-source');
  const { createApp } = await import('./app');
  const { logger } = await import('./lib/logger');
  const { closeMailer } = await import('./lib/mailer');

  const dataSource = await createDataSource(config.DATABASE_URL, config.DB_POOL_SIZE).initialize();
  const applied = await dataSource.runMigrations({ transaction: 'each' });
  if (applied.length) logger.info({ migrations: applied.map((m) => m.name) }, 'applied migrations');

  const server = createApp(dataSource).listen(config.PORT, config.HOST, () => {
    logger.info(`Boardside listening on http://${config.HOST}:${config.PORT}`);
  });
  server.keepAliveTimeout = 5000;

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    server.close(async () => {
      closeMailer();
      await dataSource.destroy();
      process.exit(0);
    });
    server.closeIdleConnections();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((error) => {
  console.error('Boardside failed to start:', error instanceof Error ? error.message : error);
  process.exit(1);
});
