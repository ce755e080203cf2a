/** Brings the test database to the latest migration once before the integration tests. */
import './env';
import { createDataSource } from '../../server/data-source';

export default async function globalSetup() {
  const dataSource = await createDataSource(process.env.DATABASE_URL!, 2).initialize();
  try {
    await dataSource.runMigrations({ transaction: 'each' });
  } finally {
    await dataSource.destroy();
  }
}
