/**
 * The device database for the running app: opened once, shared by every screen, closed when
 * another tab takes over. The board's components reach it only through the hooks in store/.
 */
import { DeviceStore } from './store';
import { openExpoDriver } from './expo-driver';

export { DeviceStore, StoreError, localDay, sessionIdFor } from './store';
export type { OutboxEntry, RecordInput } from './store';

let opening: Promise<DeviceStore> | null = null;

export function openDeviceStore(): Promise<DeviceStore> {
  opening ??= openExpoDriver()
    .then((driver) => DeviceStore.open(driver))
    .catch((error) => {
      opening = null;
      throw error;
    });
  return opening;
}

/** The open store; only valid after openDeviceStore() resolved (the device gate ensures it). */
export async function deviceStore(): Promise<DeviceStore> {
  if (!opening) throw new Error('The device store is not open in this tab');
  return opening;
}

export async function closeDeviceStore(): Promise<void> {
  const current = opening;
  opening = null;
  if (current) await (await current).close();
}
