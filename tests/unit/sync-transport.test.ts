/** Step 1, the HTTP transport: answers parsed with the shared schemas, failures mapped to the sync's error classes. */
import { RequestRefused, ResyncRequired, ServerUnavailable, TransportError } from '../../sync/transport';
import { httpSyncTransport, KEEPALIVE_MAX_BYTES, syncTransportFor } from '../../store/sync-transport';

const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
const clock = `${String(Date.UTC(2026, 11, 2)).padStart(15, '0')}-000000-server`;

function answer(status: number, body: unknown) {
  return jest.fn(async () => new Response(body === undefined ? null : JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } }));
}

describe('httpSyncTransport', () => {
  const realFetch = global.fetch;
  afterEach(() => {
    global.fetch = realFetch;
  });

  it('pulls with teamId, cursor and limit, and parses the page', async () => {
    const page = { changes: [], tombstones: [], evictions: [], nextCursor: 3, hasMore: false, remaining: 0, serverClock: clock, serverTime: '2026-12-02T00:00:00Z' };
    const fetch = answer(200, page);
    global.fetch = fetch as unknown as typeof global.fetch;
    await expect(httpSyncTransport.pull({ teamId: TEAM, cursor: 7, limit: 1000 })).resolves.toEqual(page);
    expect(String((fetch.mock.calls[0] as unknown[])[0])).toBe(`/api/sync/pull?teamId=${TEAM}&cursor=7&limit=1000`);
  });

  it('posts the push body', async () => {
    const fetch = answer(200, { results: [], serverClock: clock, serverTime: '2026-12-02T00:00:00Z' });
    global.fetch = fetch as unknown as typeof global.fetch;
    const body = { clientId: TEAM, teamId: TEAM, ops: [] };
    await httpSyncTransport.push(body);
    const init = (fetch.mock.calls[0] as unknown[])[1] as RequestInit;
    expect(init.method).toBe('POST');
    expect(JSON.parse(String(init.body))).toEqual(body);
  });

  it.each([
    [410, { error: { code: 'resync_required', message: 'too old' } }, ResyncRequired],
    [503, { error: { code: 'unavailable', message: 'database down' } }, ServerUnavailable],
    [500, undefined, ServerUnavailable],
    [400, { error: { code: 'validation', message: 'bad op' } }, RequestRefused],
    [413, { error: { code: 'too_large', message: 'too big' } }, RequestRefused],
    [401, { error: { code: 'unauthorized', message: 'Sign in' } }, TransportError],
    [404, undefined, TransportError],
    [429, undefined, TransportError],
  ])('maps HTTP %i to %p', async (status, body, kind) => {
    global.fetch = answer(status, body) as unknown as typeof global.fetch;
    await expect(httpSyncTransport.pull({ teamId: TEAM, cursor: 0, limit: 10 })).rejects.toBeInstanceOf(kind);
  });

  it('maps no answer at all (offline) and an answer it cannot read to TransportError', async () => {
    global.fetch = jest.fn(async () => {
      throw new TypeError('Failed to fetch');
    }) as unknown as typeof global.fetch;
    await expect(httpSyncTransport.pull({ teamId: TEAM, cursor: 0, limit: 10 })).rejects.toBeInstanceOf(TransportError);
    global.fetch = answer(200, { nonsense: true }) as unknown as typeof global.fetch;
    await expect(httpSyncTransport.pull({ teamId: TEAM, cursor: 0, limit: 10 })).rejects.toBeInstanceOf(TransportError);
  });

  it("a run's transport sends nothing once someone else has signed in on the device", async () => {
    const fetch = answer(200, { results: [], serverClock: clock, serverTime: '2026-12-02T00:00:00Z' });
    global.fetch = fetch as unknown as typeof global.fetch;
    let signedIn = 'coach';
    const transport = syncTransportFor(() => signedIn === 'coach');
    await transport.push({ clientId: TEAM, teamId: TEAM, ops: [] });
    expect(fetch).toHaveBeenCalledTimes(1);
    signedIn = 'skater';
    await expect(transport.push({ clientId: TEAM, teamId: TEAM, ops: [] })).rejects.toBeInstanceOf(TransportError);
    await expect(transport.pull({ teamId: TEAM, cursor: 0, limit: 10 })).rejects.toBeInstanceOf(TransportError);
    expect(fetch).toHaveBeenCalledTimes(1);
  });

  it('a push made while the page is hidden may outlive the page (keepalive), if small enough', async () => {
    const fetch = answer(200, { results: [], serverClock: clock, serverTime: '2026-12-02T00:00:00Z' });
    global.fetch = fetch as unknown as typeof global.fetch;
    const g = globalThis as { document?: unknown };
    const before = g.document;
    try {
      g.document = { visibilityState: 'visible' };
      await httpSyncTransport.push({ clientId: TEAM, teamId: TEAM, ops: [] });
      g.document = { visibilityState: 'hidden' };
      await httpSyncTransport.push({ clientId: TEAM, teamId: TEAM, ops: [] });
      const big = { clientId: TEAM, teamId: TEAM, ops: [], pad: 'x'.repeat(KEEPALIVE_MAX_BYTES) } as never;
      await httpSyncTransport.push(big);
    } finally {
      g.document = before;
    }
    const flags = fetch.mock.calls.map((call) => ((call as unknown[])[1] as RequestInit).keepalive === true);
    expect(flags).toEqual([false, true, false]);
  });
});
