/**
 * The small SQL interface the device store is written against. On the device it is expo-sqlite
 * (sync/expo-driver.ts); in unit tests it is SQLite compiled to WebAssembly (sql.js), so the
 * store's real SQL runs under jest where expo-sqlite's native module does not exist.
 */
export type SqlValue = string | number | null;

export interface SqlDriver {
  /** Runs one or more statements without parameters. */
  exec(sql: string): Promise<void>;
  /** Runs one statement; answers how many rows it changed. */
  run(sql: string, params?: readonly SqlValue[]): Promise<{ changes: number }>;
  all<T>(sql: string, params?: readonly SqlValue[]): Promise<T[]>;
  close(): Promise<void>;
}

/**
 * Serialises work on one connection. expo-sqlite on the web has no exclusive transactions, and a
 * transaction there can capture unrelated statements that run meanwhile, so every write (and
 * every transaction) goes through this queue, one at a time.
 */
export class SerialQueue {
  private tail: Promise<unknown> = Promise.resolve();

  run<T>(task: () => Promise<T>): Promise<T> {
    const result = this.tail.then(task, task);
    this.tail = result.catch(() => undefined);
    return result;
  }
}

/** Runs `work` inside BEGIN/COMMIT on the queue; any error rolls the whole unit back. */
export function transaction<T>(driver: SqlDriver, queue: SerialQueue, work: () => Promise<T>): Promise<T> {
  return queue.run(async () => {
    await driver.exec('BEGIN');
    try {
      const result = await work();
      await driver.exec('COMMIT');
      return result;
    } catch (error) {
      await driver.exec('ROLLBACK');
      throw error;
    }
  });
}
