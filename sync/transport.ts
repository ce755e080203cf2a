/**
 * The sync protocol as the device sees it: something that can push an outbox batch and read a
 * pull page. The app's implementation is HTTP (store/sync-transport.ts); tests use a fake server.
 *
 * Transport failures are classified so the sync knows what to do next:
 * - TransportError: no (usable) answer, e.g. offline, timed out, signed out for now. Retry later;
 *   a push whose reply was lost is safe to send again (the server answers `duplicate`).
 * - ServerUnavailable (a TransportError): the server answered 5xx/503 and applied nothing.
 * - ResyncRequired: 410, the cursor is older than the server's tombstones: re-sync from scratch.
 * - RequestRefused: the server refused the request itself as malformed (400/413/422). For a push
 *   batch this points at one bad op: the batch is split to find it and only that op is rejected.
 */
import type { PullReply, PushBody, PushReply } from '../shared/schemas/sync';

export interface PullQuery {
  teamId: string;
  cursor: number;
  limit: number;
}

export interface SyncTransport {
  push(body: PushBody): Promise<PushReply>;
  pull(q: PullQuery): Promise<PullReply>;
  /** The server's current time (ISO). Optional: lets a device with a wrong clock correct itself. */
  time?(): Promise<string>;
}

export class TransportError extends Error {
  constructor(message: string, readonly status = 0) {
    super(message);
    this.name = 'TransportError';
  }
}

export class ServerUnavailable extends TransportError {
  constructor(message = 'The Boardside server is unavailable right now; changes stay on this device and will be sent later.', status = 503) {
    super(message, status);
    this.name = 'ServerUnavailable';
  }
}

export class ResyncRequired extends Error {
  constructor(message = 'This device was away too long: it has to load the team again from the server.') {
    super(message);
    this.name = 'ResyncRequired';
  }
}

export class RequestRefused extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly code: string,
  ) {
    super(message);
    this.name = 'RequestRefused';
  }
}
