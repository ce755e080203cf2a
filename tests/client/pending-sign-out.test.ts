/**
 * A sign-out the server could not hear (offline at the rink) still holds on the device: the next
 * app start restores nobody (no refresh, no offline sign-in from the remembered identity), the
 * sign-out is sent once the server answers and forgotten only then, and a new sign-in sends it
 * first. fetch is faked; localStorage (jsdom's) survives the simulated restarts.
 */
import { waitFor } from '@testing-library/react-native';

import { apiRequest, refreshSession } from '../../store/api';
import { loadIdentity } from '../../store/identity-cache';
import { resetSessionForTests, useSession } from '../../store/session';
import { fakeResponse } from './fake-fetch';

const COACH_ID = '0192f1a8-7c3e-7a10-8000-000000000001';
const session = (token: string, id = COACH_ID) => ({
  accessToken: token,
  expiresIn: 900,
  user: { id, email: `${id.slice(-4)}@example.org`, displayName: 'Coach' },
  memberships: [{ teamId: '0192f1a8-7c3e-7a10-8000-0000000000aa', teamName: 'Ice Squad', role: 'head_coach', skaterId: null }],
});

const offline = () => Promise.reject(new TypeError('Failed to fetch'));
const unauthorized = { error: { code: 'unauthorized', message: 'Not signed in' } };

/** A fake server: answers by path; everything it was asked lands in `paths`. */
function server(answers: Record<string, () => Promise<Response>>) {
  return (url: string) => (answers[url] ?? (() => Promise.resolve(fakeResponse(404))))();
}

describe('a sign-out the server has not heard of yet', () => {
  const fetchMock = jest.fn();
  const paths = () => fetchMock.mock.calls.map(([url]) => url as string);

  beforeEach(() => {
    localStorage.clear();
    resetSessionForTests();
    fetchMock.mockReset();
    global.fetch = fetchMock as unknown as typeof fetch;
  });

  /** The coach is signed in, then signs out while the server cannot be reached. */
  async function signOutOffline({ alsoLocally = true } = {}) {
    useSession.getState().setSession(session('coach-token') as never);
    fetchMock.mockImplementation(offline);
    await expect(apiRequest('/api/auth/sign-out', { method: 'POST', skipRefresh: true })).rejects.toMatchObject({ code: 'network' });
    // What store/auth.ts's sign-out does next, whatever the server said.
    if (alsoLocally) useSession.getState().signOutLocally();
    fetchMock.mockReset();
  }

  /** A new start of the app on this device. */
  async function restart() {
    resetSessionForTests();
    await useSession.getState().bootstrap();
  }

  it('starts signed out with the server back, sends the sign-out with the cookie and never refreshes', async () => {
    await signOutOffline();
    fetchMock.mockImplementation(
      server({
        '/api/auth/sign-out': () => Promise.resolve(fakeResponse(204)),
        '/api/auth/refresh': () => Promise.resolve(fakeResponse(200, session('revived'))),
      }),
    );

    await restart();
    expect(useSession.getState().status).toBe('signedOut');
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));
    const [, init] = fetchMock.mock.calls[0];
    expect(init).toMatchObject({ method: 'POST', credentials: 'include' });
    expect(init.headers.Authorization).toBeUndefined();

    // Answered: the next start asks the server as usual (and is refused: the cookie is gone).
    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/auth/refresh': () => Promise.resolve(fakeResponse(401, unauthorized)) }));
    await restart();
    expect(paths()).toEqual(['/api/auth/refresh']);
    expect(useSession.getState().status).toBe('signedOut');
  });

  it('does not sign in from the remembered identity while offline, even if the app closed before the local sign-out', async () => {
    await signOutOffline({ alsoLocally: false });
    expect(loadIdentity()?.user.id).toBe(COACH_ID);
    fetchMock.mockImplementation(offline);

    await restart();
    expect(useSession.getState()).toMatchObject({ status: 'signedOut', user: null, offline: false });
    expect(loadIdentity()).toBeNull();
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));
    expect(paths()).not.toContain('/api/auth/refresh');
  });

  it('keeps the sign-out owed while the server cannot end it (5xx), forgets it on 2xx or 401', async () => {
    await signOutOffline();

    fetchMock.mockImplementation(server({ '/api/auth/sign-out': () => Promise.resolve(fakeResponse(503)) }));
    await restart();
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));
    expect(useSession.getState().status).toBe('signedOut');

    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/auth/sign-out': () => Promise.resolve(fakeResponse(401, unauthorized)) }));
    await restart();
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));

    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/auth/refresh': () => Promise.resolve(fakeResponse(401, unauthorized)) }));
    await restart();
    expect(paths()).toEqual(['/api/auth/refresh']);
  });

  it('sends the owed sign-out before a new sign-in, and holds the sign-in back while it cannot be sent', async () => {
    await signOutOffline();

    // Still no server: the sign-in is not sent, so the old cookie is not replaced.
    fetchMock.mockImplementation(offline);
    await expect(
      apiRequest('/api/auth/sign-in', { method: 'POST', body: { email: 'b@example.org', password: 'x' }, skipRefresh: true }),
    ).rejects.toMatchObject({ code: 'network' });
    expect(paths()).toEqual(['/api/auth/sign-out']);

    // The server is back: the old sign-in is ended first, then the new one starts.
    fetchMock.mockReset();
    const other = session('skater-token', '0192f1a8-7c3e-7a10-8000-000000000002');
    fetchMock.mockImplementation(
      server({
        '/api/auth/sign-out': () => Promise.resolve(fakeResponse(204)),
        '/api/auth/sign-in': () => Promise.resolve(fakeResponse(200, other)),
      }),
    );
    await expect(
      apiRequest('/api/auth/sign-in', { method: 'POST', body: { email: 'b@example.org', password: 'x' }, skipRefresh: true }),
    ).resolves.toEqual(other);
    expect(paths()).toEqual(['/api/auth/sign-out', '/api/auth/sign-in']);

    // Sent once: it is not sent again later (it would end the new person's sign-in).
    useSession.getState().setSession(other as never);
    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/me': () => Promise.resolve(fakeResponse(200, { ok: true })) }));
    await apiRequest('/api/me');
    expect(paths()).toEqual(['/api/me']);
  });

  it('does not refresh while a sign-out is owed', async () => {
    await signOutOffline();
    fetchMock.mockImplementation(server({ '/api/auth/refresh': () => Promise.resolve(fakeResponse(200, session('revived'))) }));
    await expect(refreshSession()).resolves.toEqual({ status: 'refused' });
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('a refresh already on its way when the coach signs out does not sign them back in', async () => {
    useSession.getState().setSession(session('old') as never);
    let answerRefresh: (response: Response) => void = () => undefined;
    let meCalls = 0;
    fetchMock.mockImplementation(
      server({
        '/api/me': () => Promise.resolve(meCalls++ === 0 ? fakeResponse(401, unauthorized) : fakeResponse(200, { ok: true })),
        '/api/auth/refresh': () => new Promise<Response>((resolve) => (answerRefresh = resolve)),
        '/api/auth/sign-out': offline,
      }),
    );
    const request = apiRequest('/api/me').catch(() => undefined);
    await waitFor(() => expect(paths()).toContain('/api/auth/refresh'));

    await expect(apiRequest('/api/auth/sign-out', { method: 'POST', skipRefresh: true })).rejects.toMatchObject({ code: 'network' });
    useSession.getState().signOutLocally();
    answerRefresh(fakeResponse(200, session('rotated')));
    await request;

    expect(useSession.getState()).toMatchObject({ status: 'signedOut', user: null, accessToken: null });
    expect(loadIdentity()).toBeNull();
  });

  it("is sent on the browser's 'online' event", async () => {
    await signOutOffline();
    fetchMock.mockImplementation(offline);
    await restart();
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));

    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/auth/sign-out': () => Promise.resolve(fakeResponse(204)) }));
    window.dispatchEvent(new Event('online'));
    await waitFor(() => expect(paths()).toEqual(['/api/auth/sign-out']));

    // Answered: another 'online' sends nothing.
    fetchMock.mockReset();
    window.dispatchEvent(new Event('online'));
    await new Promise((resolve) => setTimeout(resolve, 20));
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('a sign-out the server answered leaves nothing owed', async () => {
    useSession.getState().setSession(session('coach-token') as never);
    fetchMock.mockImplementation(server({ '/api/auth/sign-out': () => Promise.resolve(fakeResponse(204)) }));
    await apiRequest('/api/auth/sign-out', { method: 'POST', skipRefresh: true });
    expect(fetchMock.mock.calls[0][1].headers.Authorization).toBe('Bearer coach-token');
    useSession.getState().signOutLocally();

    fetchMock.mockReset();
    fetchMock.mockImplementation(server({ '/api/auth/refresh': () => Promise.resolve(fakeResponse(401, unauthorized)) }));
    await restart();
    expect(paths()).toEqual(['/api/auth/refresh']);
  });
});
