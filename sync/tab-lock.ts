/**
 * One tab owns the device database. Browsers let only one tab at a time open the SQLite file
 * (its storage is an exclusive file handle), so a second tab must not try: it would fail with a
 * cryptic storage error. The owner holds a Web Lock for as long as it lives; a second tab sees
 * the lock taken and offers to take over, which asks the owner (over a BroadcastChannel) to
 * close its database and let go.
 */
const LOCK_NAME = 'boardside-device-db';
const CHANNEL_NAME = 'boardside-tabs';

export type TabOwnership =
  | { state: 'owner'; release: () => void }
  | { state: 'elsewhere' }
  | { state: 'unsupported' };

type Locks = {
  request: (name: string, options: { ifAvailable?: boolean; mode?: 'exclusive' }, callback: (lock: unknown) => Promise<void>) => Promise<void>;
};

function locks(): Locks | undefined {
  return typeof navigator !== 'undefined' ? (navigator as unknown as { locks?: Locks }).locks : undefined;
}

/**
 * Tries to become the owner without waiting. `onAskedToLeave` runs in the owner when another tab
 * takes over; it must close the database, after which the lock is released.
 */
export async function claimTab(onAskedToLeave: () => Promise<void>): Promise<TabOwnership> {
  const api = locks();
  if (!api || typeof BroadcastChannel === 'undefined') return { state: 'unsupported' };
  return new Promise<TabOwnership>((resolve) => {
    api
      .request(LOCK_NAME, { ifAvailable: true, mode: 'exclusive' }, async (lock) => {
        if (!lock) {
          resolve({ state: 'elsewhere' });
          return;
        }
        await new Promise<void>((release) => {
          const channel = new BroadcastChannel(CHANNEL_NAME);
          const letGo = () => {
            channel.close();
            release();
          };
          channel.onmessage = async (event: MessageEvent) => {
            if (event.data?.type !== 'take-over') return;
            await onAskedToLeave();
            letGo();
          };
          resolve({ state: 'owner', release: letGo });
        });
      })
      .catch(() => resolve({ state: 'unsupported' }));
  });
}

/** From a second tab: ask the owner to let go, then wait until the lock is ours. */
export async function takeOver(onAskedToLeave: () => Promise<void>, timeoutMs = 5000): Promise<TabOwnership> {
  const api = locks();
  if (!api) return { state: 'unsupported' };
  const channel = new BroadcastChannel(CHANNEL_NAME);
  channel.postMessage({ type: 'take-over' });
  channel.close();
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const result = await claimTab(onAskedToLeave);
    if (result.state !== 'elsewhere') return result;
    await new Promise((resolve) => setTimeout(resolve, 150));
  }
  return { state: 'elsewhere' };
}
