/**
 * Whose notebook the device holds. One database file serves everyone who signs in on this device
 * (a club tablet, a family phone), so it belongs to one person at a time (sync/store.ts
 * switchUser): the device gate opens it for the signed-in user before any screen reads it, and
 * every sign-out - the button, or a session the server ended - empties it of the rows that person
 * could read. Their unsent changes stay on the device, parked for them, until they sign in here
 * again and sync.
 */
import { deviceStore, openedDeviceStore } from '../sync';
import { useSession } from './session';

let watching = false;

/** Any sign-out, however it happens (refresh refused, sign-out elsewhere), releases the device. */
function watchSignOut() {
  if (watching) return;
  watching = true;
  useSession.subscribe((now, before) => {
    if (before.user && !now.user) void releaseDevice();
  });
}

/** Opens the device's notebook for this user (another person's held rows are wiped first). */
export async function openDeviceFor(userId: string): Promise<void> {
  watchSignOut();
  await (await deviceStore()).switchUser(userId);
}

/** Empties the held rows for nobody; a no-op when this tab does not hold the database. Never throws. */
export async function releaseDevice(): Promise<void> {
  try {
    const store = await openedDeviceStore();
    if (store) await store.signOut();
  } catch {
    // The next person's sign-in wipes the rows before anything is shown (the device gate).
  }
}

/** The signed-in user's changes still on this device (waiting or refused), 0 if none or unknown. */
export async function unsentOnDevice(): Promise<number> {
  try {
    const store = await openedDeviceStore();
    if (!store) return 0;
    return (await store.pendingCount()) + (await store.rejectedCount());
  } catch {
    return 0;
  }
}
