/**
 * The full-size convergence proof (shared/SYNC.md "How it is proven" 1): 20 clients x 500 ops by
 * default, real device stores (sql.js) running the real sync engine against an in-process server
 * on the real PostgreSQL (coaches, skaters, a device shared by a coach and a skater; the scenario
 * of tests/integration/support/convergence.ts), with 20% of requests and 10% of replies lost, late requests, random
 * delays, and a quarter of the device clocks +/-10 minutes. Prints the totals (ops, lost,
 * duplicated, resurrected, time); exits 1 if anything was lost, duplicated, resurrected or differs.
 *
 *   TSX_TSCONFIG_PATH=server/tsconfig.json npx tsx bench/convergence.ts
 *
 * Needs PostgreSQL and the mail sink (invitations go by mail): `npm run bench` starts both; by
 * hand, see tests/integration/env.ts for the defaults (boardside_test, SMTP 2526). Sizes:
 * CONVERGENCE_CLIENTS, CONVERGENCE_OPS, CONVERGENCE_SEED.
 */
import fc from 'fast-check';

const CLIENTS = Number(process.env.CONVERGENCE_CLIENTS ?? 20);
const OPS = Number(process.env.CONVERGENCE_OPS ?? 500);
const SEED = Number(process.env.CONVERGENCE_SEED ?? 20260115);

async function main() {
  // Defaults of the integration tests (only what the caller did not set), long-lived tokens.
  process.env.ACCESS_TOKEN_TTL_SECONDS ??= '86400';
  process.env.LOGIN_LIMIT_PER_IP = '100000';
  process.env.LOGIN_LIMIT_PER_ACCOUNT = '100000';
  process.env.BCRYPT_COST ??= '4';
  // eslint-disable-next-line @typescript-eslint/no-require-imports -- env.ts is a script (sets defaults), not a module
  require('../tests/integration/env');
  process.env.LOG_LEVEL = 'silent';

  const { startTestServer } = await import('../tests/integration/helpers');
  const { listen } = await import('../tests/integration/support/device-client');
  const { describeResult, runConvergence, scheduleArb } = await import('../tests/integration/support/convergence');
  const { createDataSource } = await import('../server/data-source');

  const migrator = await createDataSource(process.env.DATABASE_URL!, 2).initialize();
  await migrator.runMigrations({ transaction: 'each' });
  await migrator.destroy();

  const server = await startTestServer();
  const endpoint = await listen(server.app);
  try {
    // The generator of the test (tests/integration/sync-convergence.test.ts), fixed seed.
    const [[steps, faultSeed]] = fc.sample(fc.tuple(scheduleArb(CLIENTS, OPS), fc.integer({ min: 1, max: 2 ** 30 })), { seed: SEED, numRuns: 1 });
    console.log(`convergence: ${CLIENTS} clients x ${OPS} ops, seed ${SEED}`);
    const result = await runConvergence({ app: server.app, dataSource: server.dataSource, endpoint }, steps, {
      clients: CLIENTS,
      faultSeed,
      // The sizes of the jest test (tests/integration/sync-convergence.test.ts).
      batchSize: 100,
      pageSize: 1000,
      switchPercent: 2,
      log: (line) => console.log(`  ${line}`),
    });
    console.log(describeResult(result));
    const problems = [
      ...result.lost,
      ...result.duplicated,
      ...result.resurrected,
      ...result.mismatches,
      ...result.viewMismatches,
      ...result.leaks,
      ...result.unexpected,
    ];
    console.log(
      `TOTAL ops=${result.ops} lost=${result.lost.length} duplicated=${result.duplicated.length} resurrected=${result.resurrected.length} ` +
        `mismatches=${result.mismatches.length} leaks=${result.leaks.length} time=${(result.ms / 1000).toFixed(1)}s`,
    );
    if (problems.length > 0) {
      console.error(problems.slice(0, 20).join('\n'));
      process.exitCode = 1;
    }
  } finally {
    await endpoint.close();
    await server.close();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
