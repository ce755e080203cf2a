/**
 * The sync transport over HTTP (POST /api/sync/push, GET /api/sync/pull), through the app's one
 * API client (auth refresh, timeouts, parsed answers). Failures become the sync's error classes
 * (sync/transport.ts) so the run knows whether to retry later, re-sync, or split a batch.
 */
import { z } from 'zod';
import { pullReplySchema, pushReplySchema } from '../shared/schemas/sync';
import { RequestRefused, ResyncRequired, ServerUnavailable, TransportError, type SyncTransport } from '../sync/transport';
import { apiRequestParsed, isApiRequestError, NETWORK_MESSAGE } from './api';

/** Maps an API client failure to the sync's error classes. */
export function toSyncTransportError(error: unknown): Error {
  if (!isApiRequestError(error)) return new TransportError(error instanceof Error ? error.message : NETWORK_MESSAGE);
  const { status, code, message } = error;
  if (status === 410 || code === 'resync_required') return new ResyncRequired();
  if (status === 0) return new TransportError(message || NETWORK_MESSAGE, 0);
  if (status >= 500) return new ServerUnavailable(status === 503 ? undefined : message, status);
  // The request itself was refused as malformed: only these point at the ops it carried.
  if (status === 400 || status === 413 || status === 422) return new RequestRefused(message, status, code);
  // 401/403 (signed out for now), 404 (no sync API here yet), 408, 409, 429: try again later.
  return new TransportError(message, status);
}

async function call<T>(request: () => Promise<T>): Promise<T> {
  try {
    return await request();
  } catch (error) {
    throw toSyncTransportError(error);
  }
}

const healthSchema = z.object({ serverTime: z.string() });

/** Browsers carry at most 64 KB of keepalive bodies at once; stay well under it. */
export const KEEPALIVE_MAX_BYTES = 60_000;

/**
 * A push made while the page is hidden (the coach switched app, locked the phone or is closing
 * the tab) is sent with `keepalive`, so it still reaches the server if the page is then closed.
 * Only small bodies qualify: the browser refuses larger keepalive requests outright.
 */
export function mayOutliveThePage(body: unknown): boolean {
  if (typeof document === 'undefined' || document.visibilityState !== 'hidden') return false;
  return JSON.stringify(body).length <= KEEPALIVE_MAX_BYTES;
}

export const httpSyncTransport: SyncTransport = {
  time: () => call(async () => (await apiRequestParsed('/api/health', healthSchema)).serverTime),
  push: (body) => call(() => apiRequestParsed('/api/sync/push', pushReplySchema, { method: 'POST', body, keepalive: mayOutliveThePage(body) })),
  pull: ({ teamId, cursor, limit }) => {
    const query = new URLSearchParams({ teamId, cursor: String(cursor), limit: String(limit) });
    return call(() => apiRequestParsed(`/api/sync/pull?${query.toString()}`, pullReplySchema));
  },
};

/**
 * The HTTP transport for a run started by one user. Requests go out with whoever's token is
 * current, so on a shared device a run must not send another batch once someone else has signed
 * in: every request checks first that the run's user is still the one signed in.
 */
export function syncTransportFor(isRunUser: () => boolean): SyncTransport {
  const guard = <T>(request: () => Promise<T>) => {
    if (!isRunUser()) return Promise.reject(new TransportError('Someone else signed in on this device: this sync stopped'));
    return request();
  };
  return {
    time: () => guard(httpSyncTransport.time!),
    push: (body) => guard(() => httpSyncTransport.push(body)),
    pull: (query) => guard(() => httpSyncTransport.pull(query)),
  };
}
