/**
 * The one TypeORM DataSource. synchronize is off: the schema changes only through the migrations
 * in server/migrations, which run at start-up (and through `npm run db:migrate`).
 */
import 'reflect-metadata';
import { DataSource } from 'typeorm';
import { SnakeNamingStrategy } from 'typeorm-naming-strategies';
import { entities } from './entities';
import { migrations } from './migrations';

export function createDataSource(url: string, poolSize = 10): DataSource {
  return new DataSource({
    type: 'postgres',
    url,
    entities,
    migrations,
    synchronize: false,
    migrationsRun: false,
    migrationsTransactionMode: 'each',
    namingStrategy: new SnakeNamingStrategy(),
    // Off: TypeORM's console logger prints a failed query with its parameters (password and token
    // hashes). Errors still reach the app's error handler, which logs the unexpected ones via pino.
    logging: false,
    extra: { max: poolSize, application_name: 'boardside' },
  });
}
