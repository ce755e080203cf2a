/** `npm run db:migrate`: apply pending migrations to DATABASE_URL, or undo the last with --revert. */
import { createDataSource } from '../data-source';

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is required');
  const dataSource = await createDataSource(url, 2).initialize();
  try {
    if (process.argv.includes('--revert')) {
      await dataSource.undoLastMigration({ transaction: 'each' });
      console.log('reverted the last migration');
    } else {
      const applied = await dataSource.runMigrations({ transaction: 'each' });
      console.log(applied.length ? `applied ${applied.map((m) => m.name).join(', ')}` : 'database is up to date');
    }
  } finally {
    await dataSource.destroy();
  }
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
