/**
 * The device database for the running app: opened once, shared by every screen, closed when
 * another tab takes over. The board's components reach it only through the hooks in store/.
 */
import { DeviceStore } from './store';
import { openExpoDriver } from './expo-driver';
import type { SqlDriver } from './driver';

export { DeviceStore, StoreError, localDay, sessionIdFor } from './store';
export type { NoteFix, OutboxEntry, RecordInput, TidySession } from './store';

let opening: Promise<DeviceStore> | null = null;

/**
 * `npm run bench` fills the device with tens of thousands of rows before it measures taps. It
 * switches this handle on with a localStorage flag; ordinary use never sets it.
 */
function exposeForBenchmark(store: DeviceStore, driver: SqlDriver) {
  try {
    if (typeof localStorage !== 'undefined' && localStorage.getItem('boardside.bench') === '1') {
      (globalThis as { __boardsideBench?: unknown }).__boardsideBench = { store, driver };
    }
  } catch {
    // No storage: no benchmark handle.
  }
}

export function openDeviceStore(): Promise<DeviceStore> {
  opening ??= openExpoDriver()
    .then(async (driver) => {
      const store = await DeviceStore.open(driver);
      exposeForBenchmark(store, driver);
      return store;
    })
    .catch((error) => {
      opening = null;
      throw error;
    });
  return opening;
}

/** The store if this tab has it open (or is opening it), else null. */
export async function openedDeviceStore(): Promise<DeviceStore | null> {
  if (!opening) return null;
  return opening.catch(() => null);
}

/** The open store; only valid after openDeviceStore() resolved (the device gate ensures it). */
export async function deviceStore(): Promise<DeviceStore> {
  if (!opening) throw new Error('The device store is not open in this tab');
  return opening;
}

/** The browser's storage said the database file is held elsewhere (another tab's worker). */
export const isDatabaseBusy = (error: unknown) =>
  /NoModificationAllowed|createSyncAccessHandle|Invalid VFS state/i.test(String(error));

export async function closeDeviceStore(): Promise<void> {
  const current = opening;
  opening = null;
  if (current) await (await current).close();
}
