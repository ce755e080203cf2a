/** The API client: bearer token, one refresh on 401 then a retry, and errors carrying fields. */
import { ApiRequestError, apiRequest } from '../../store/api';
import { resetSessionForTests, useSession } from '../../store/session';
import { fakeResponse } from './fake-fetch';

const session = (token: string) => ({
  accessToken: token,
  expiresIn: 900,
  user: { id: '0192f1a8-7c3e-7a10-8000-000000000001', email: 'c@example.org', displayName: 'Coach' },
  memberships: [],
});

const reply = fakeResponse;

describe('apiRequest', () => {
  const fetchMock = jest.fn();
  beforeEach(() => {
    resetSessionForTests();
    fetchMock.mockReset();
    global.fetch = fetchMock as unknown as typeof fetch;
  });

  it('refreshes once on a 401 and retries with the new token', async () => {
    useSession.getState().setSession(session('old'));
    fetchMock
      .mockResolvedValueOnce(reply(401, { error: { code: 'token_expired', message: 'Expired' } }))
      .mockResolvedValueOnce(reply(200, session('new')))
      .mockResolvedValueOnce(reply(200, { ok: true }));

    await expect(apiRequest('/api/me')).resolves.toEqual({ ok: true });

    const calls = fetchMock.mock.calls.map(([url, init]) => [url, init.method, init.headers.Authorization]);
    expect(calls).toEqual([
      ['/api/me', 'GET', 'Bearer old'],
      ['/api/auth/refresh', 'POST', undefined],
      ['/api/me', 'GET', 'Bearer new'],
    ]);
    expect(useSession.getState().accessToken).toBe('new');
  });

  it('signs out locally when the refresh is refused', async () => {
    useSession.getState().setSession(session('old'));
    fetchMock
      .mockResolvedValueOnce(reply(401, { error: { code: 'token_expired', message: 'Expired' } }))
      .mockResolvedValueOnce(reply(401, { error: { code: 'unauthorized', message: 'No session' } }));
    await expect(apiRequest('/api/me')).rejects.toMatchObject({ status: 401 });
    expect(useSession.getState().status).toBe('signedOut');
  });

  it('throws ApiRequestError with code, message and fields', async () => {
    fetchMock.mockResolvedValueOnce(
      reply(409, { error: { code: 'conflict', message: 'Already invited', fields: { email: 'Already invited' } } }),
    );
    const error = await apiRequest('/api/teams/x/invitations', { method: 'POST', body: {} }).catch((e) => e);
    expect(error).toBeInstanceOf(ApiRequestError);
    expect(error).toMatchObject({ status: 409, code: 'conflict', message: 'Already invited', fields: { email: 'Already invited' } });
  });

  it('falls back to signed out when bootstrap cannot reach the server', async () => {
    fetchMock.mockRejectedValueOnce(new TypeError('Failed to fetch'));
    await useSession.getState().bootstrap();
    expect(useSession.getState().status).toBe('signedOut');
  });
});
