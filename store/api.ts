/**
 * The one HTTP client for Boardside's API.
 *
 * - Same origin by default ('' on web): the Express server serves the web app and '/api', so the
 *   HttpOnly refresh cookie travels without CORS. EXPO_PUBLIC_API_URL points elsewhere if needed.
 * - The access token lives only in memory (the session store hands it over through
 *   `configureApiAuth`); it is never written to storage where a script could read it.
 * - On a 401 the client refreshes once (a single shared refresh for concurrent requests) and
 *   retries; if that fails the session store is told the user is signed out.
 * - Every failure becomes an ApiRequestError with the server's code, message and per-field map.
 * - A sign-out is written down before it is sent and forgotten only when the server answered it
 *   (store/pending-sign-out.ts). While one is owed, no refresh is tried and every other request
 *   first sends it: a sign-in must not replace the refresh cookie that names the sign-in to end.
 *
 * This module imports nothing from the session store, so the store can import it without a cycle.
 */
import { apiErrorSchema, sessionSchema, type Session } from '../shared/schemas';
import { forgetSignOut, pendingSignOut, rememberSignOut, type PendingSignOut } from './pending-sign-out';

export const API_BASE_URL = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');

/** Fails a request that hangs (half-open rink Wi-Fi) instead of leaving a spinner forever. */
const REQUEST_TIMEOUT_MS = 15_000;

export class ApiRequestError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields?: Record<string, string>;

  constructor(status: number, code: string, message: string, fields?: Record<string, string>) {
    super(message);
    this.name = 'ApiRequestError';
    this.status = status;
    this.code = code;
    this.fields = fields;
  }
}

export const isApiRequestError = (value: unknown): value is ApiRequestError => value instanceof ApiRequestError;

/** Wording shown when a request never reached a server answer. */
export const NETWORK_MESSAGE = 'Cannot reach the Boardside server. Check the connection and try again.';

type AuthBridge = {
  getAccessToken: () => string | null;
  /** Called with the new session after a successful refresh. */
  onRefreshed: (session: Session) => void;
  /** Called when a refresh is refused: the session is over. */
  onSignedOut: () => void;
  /** Whether someone is signed in (possibly from memory, without a token). */
  isSignedIn: () => boolean;
  /** Who is signed in, for the note a sign-out leaves until the server has it. */
  getUserId: () => string | null;
};

let bridge: AuthBridge = {
  getAccessToken: () => null,
  onRefreshed: () => undefined,
  onSignedOut: () => undefined,
  isSignedIn: () => false,
  getUserId: () => null,
};

export function configureApiAuth(next: AuthBridge) {
  bridge = next;
}

export type RequestOptions = {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  signal?: AbortSignal;
  /** Skip the refresh-and-retry dance (the auth endpoints themselves). */
  skipRefresh?: boolean;
  /** Let the request finish after the page goes away (a push sent as the app is hidden or closed). */
  keepalive?: boolean;
};

async function send(path: string, options: RequestOptions, token: string | null): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  if (token) headers.Authorization = `Bearer ${token}`;

  const controller = new AbortController();
  const timer = setTimeout(() => controller.abort(), REQUEST_TIMEOUT_MS);
  const abortFromCaller = () => controller.abort();
  options.signal?.addEventListener('abort', abortFromCaller);
  try {
    return await fetch(`${API_BASE_URL}${path}`, {
      method: options.method ?? 'GET',
      headers,
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      // The refresh token is an HttpOnly cookie: it must ride along on every API call.
      credentials: 'include',
      signal: controller.signal,
      ...(options.keepalive ? { keepalive: true } : {}),
    });
  } catch (cause) {
    if (options.signal?.aborted) throw cause;
    throw new ApiRequestError(0, 'network', NETWORK_MESSAGE);
  } finally {
    clearTimeout(timer);
    options.signal?.removeEventListener('abort', abortFromCaller);
  }
}

async function readBody(response: Response): Promise<unknown> {
  if (response.status === 204) return undefined;
  const text = await response.text();
  if (!text) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
}

function toError(response: Response, body: unknown): ApiRequestError {
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { code, message, fields } = parsed.data.error;
    return new ApiRequestError(response.status, code, message, fields);
  }
  // Not our API's error shape: a proxy page, a static server without the API, a crash.
  if (response.status === 429) {
    return new ApiRequestError(429, 'rate_limited', 'Too many attempts. Wait a minute and try again.');
  }
  if (response.status >= 500 || response.status === 404 || response.status === 405 || response.status === 501) {
    return new ApiRequestError(response.status, 'unavailable', NETWORK_MESSAGE);
  }
  return new ApiRequestError(response.status, 'http_error', `The server answered ${response.status}.`);
}

/** What a refresh attempt found: a session, a refusal (signed out), or no server to ask. */
export type RefreshOutcome = { status: 'ok'; session: Session } | { status: 'refused' } | { status: 'unreachable' };

let refreshInFlight: Promise<RefreshOutcome> | null = null;

export const SIGN_OUT_PATH = '/api/auth/sign-out';

/** The server has a sign-out: it ended the sign-in, or (401) there was none left to end. */
const signOutAnswered = (response: Response) => response.ok || response.status === 401;

/**
 * Exchanges the refresh cookie for a new session. Concurrent callers share one request, because
 * the server rotates the refresh token and a second parallel refresh would present a spent one.
 * 'refused' means the sign-in is over; 'unreachable' means offline (or the server is down), which
 * must not sign the coach out at the rink.
 */
export function refreshSession(): Promise<RefreshOutcome> {
  // The person on this device signed out: their cookie must not buy a session back, whatever
  // asks (a reload, a reconnect, a request's 401). The pending sign-out is sent instead.
  if (pendingSignOut()) return Promise.resolve({ status: 'refused' });
  if (!refreshInFlight) {
    refreshInFlight = (async (): Promise<RefreshOutcome> => {
      try {
        const response = await send('/api/auth/refresh', { method: 'POST', skipRefresh: true }, null);
        // 5xx: the server (or its database) is down, which says nothing about the sign-in.
        if (response.status >= 500) return { status: 'unreachable' };
        if (!response.ok) return { status: 'refused' };
        const parsed = sessionSchema.safeParse(await readBody(response));
        return parsed.success ? { status: 'ok', session: parsed.data } : { status: 'unreachable' };
      } catch {
        return { status: 'unreachable' };
      }
    })().finally(() => {
      refreshInFlight = null;
    });
  }
  return refreshInFlight;
}

/** What sending the owed sign-out came to: nothing owed, answered (and forgotten), or still owed. */
export type PendingSignOutOutcome = 'none' | 'sent' | 'unreachable' | 'failed';

let pendingInFlight: Promise<PendingSignOutOutcome> | null = null;

/**
 * Sends the sign-out this device still owes (store/pending-sign-out.ts), with the refresh cookie
 * that names the sign-in to end. Forgotten only when the server answered it; a network failure or
 * a 5xx/429 keeps it for the next try. Concurrent callers share one request. Never throws.
 */
export function sendPendingSignOut(): Promise<PendingSignOutOutcome> {
  if (!pendingInFlight) {
    pendingInFlight = (async (): Promise<PendingSignOutOutcome> => {
      const owed = pendingSignOut();
      if (!owed) return 'none';
      try {
        const response = await send(SIGN_OUT_PATH, { method: 'POST', skipRefresh: true }, null);
        if (!signOutAnswered(response)) return 'failed';
        forgetSignOut(owed);
        return 'sent';
      } catch {
        return 'unreachable';
      }
    })().finally(() => {
      pendingInFlight = null;
    });
  }
  return pendingInFlight;
}

/** The sign-out asked for now: written down first, forgotten once the server answers it. */
async function sendSignOut(options: RequestOptions): Promise<Response> {
  const mark: PendingSignOut = rememberSignOut(bridge.getUserId());
  const response = await send(SIGN_OUT_PATH, options, bridge.getAccessToken());
  if (signOutAnswered(response)) forgetSignOut(mark);
  return response;
}

/** Sends a request with the session's token, refreshing once on a 401 (see the module header). */
async function authorizedResponse(path: string, options: RequestOptions): Promise<Response> {
  // An owed sign-out goes first. Above all before a sign-in: its answer replaces the refresh
  // cookie, and the sign-in named by the old one could then never be ended from here.
  if (pendingSignOut()) {
    const outcome = await sendPendingSignOut();
    if (outcome === 'unreachable') throw new ApiRequestError(0, 'network', NETWORK_MESSAGE);
    if (outcome === 'failed') throw new ApiRequestError(503, 'unavailable', NETWORK_MESSAGE);
  }

  const token = bridge.getAccessToken();
  let response = await send(path, options, token);

  // Only retry requests that carried a token: a 401 from sign-in means a wrong password, not an
  // expired session.
  // A device signed in from memory (offline start) has no token yet: its first 401 after the
  // network returns is the moment to get one.
  if (response.status === 401 && (token || bridge.isSignedIn()) && !options.skipRefresh) {
    const outcome = await refreshSession();
    if (outcome.status === 'ok') {
      bridge.onRefreshed(outcome.session);
      response = await send(path, options, outcome.session.accessToken);
    } else if (outcome.status === 'refused') {
      bridge.onSignedOut();
    }
  }
  return response;
}

/** Calls the API and returns the parsed JSON body (undefined for 204). Throws ApiRequestError. */
export async function apiRequest<T = unknown>(path: string, options: RequestOptions = {}): Promise<T> {
  if (path === SIGN_OUT_PATH) {
    const response = await sendSignOut(options);
    const body = await readBody(response);
    if (!response.ok) throw toError(response, body);
    return body as T;
  }
  const response = await authorizedResponse(path, options);
  const body = await readBody(response);
  if (!response.ok) throw toError(response, body);
  return body as T;
}

/**
 * Calls the API for a text file (a CSV export): the body as text with the response's headers,
 * the same sign-in handling as apiRequest. An error answer is still JSON and throws ApiRequestError.
 */
export async function apiRequestText(path: string, options: RequestOptions = {}): Promise<{ text: string; headers: Headers }> {
  const response = await authorizedResponse(path, options);
  if (!response.ok) throw toError(response, await readBody(response));
  try {
    return { text: await response.text(), headers: response.headers };
  } catch (cause) {
    if (options.signal?.aborted) throw cause;
    throw new ApiRequestError(0, 'network', NETWORK_MESSAGE);
  }
}

/** apiRequest + a zod parse of the answer: the client trusts nothing it did not check. */
export async function apiRequestParsed<T>(
  path: string,
  schema: { parse: (value: unknown) => T },
  options: RequestOptions = {},
): Promise<T> {
  const body = await apiRequest<unknown>(path, options);
  try {
    return schema.parse(body);
  } catch {
    throw new ApiRequestError(502, 'bad_response', 'The server sent an answer this app does not understand. Try reloading.');
  }
}
