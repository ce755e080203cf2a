/**
 * The server process: validate the environment, connect to PostgreSQL, run pending migrations,
 * refuse to listen beyond loopback while the demo accounts (published password) exist, listen,
 * run retention once and then on a schedule, and shut down gracefully on SIGINT/SIGTERM (finish
 * open requests, stop the schedule, close the pool).
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
  const { demoExposureProblem } = await import('./seed/exposure');
  const { scheduleRetention } = await import('./services/sync/retention');

  const dataSource = await createDataSource(config.DATABASE_URL, config.DB_POOL_SIZE).initialize();
  const applied = await dataSource.runMigrations({ transaction: 'each' });
  if (applied.length) logger.info({ migrations: applied.map((m) => m.name) }, 'applied migrations');

  const exposure = await demoExposureProblem(dataSource, config.HOST);
  if (exposure) {
    console.error(exposure);
    await dataSource.destroy();
    process.exit(1);
  }

  const server = createApp(dataSource).listen(config.PORT, config.HOST, () => {
    logger.info(`Boardside listening on http://${config.HOST}:${config.PORT}`);
  });
  server.keepAliveTimeout = 5000;

  // Tombstone purge and op-log trim: once now, then every RETENTION_INTERVAL_HOURS (unref'd timer).
  const retention = scheduleRetention(dataSource, {
    intervalMs: config.RETENTION_INTERVAL_HOURS * 3_600_000,
    opLogRetentionDays: config.OP_LOG_RETENTION_DAYS,
    log: logger,
  });

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    server.close(async () => {
      closeMailer();
      await retention.stop();
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
