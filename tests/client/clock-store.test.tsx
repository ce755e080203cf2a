/**
 * The clock's hooks over the device store (store/clock.ts), with the store replaced by spies:
 * a tap's crossing is in the cached runs before the store is even reached, stays there through a
 * re-read that runs while its write waits, and leaves again (with the reason) if the write fails;
 * every write tells sync a change waits; the open runs are the signed-in coach's only; an undo
 * takes the crossing off the screen at once and puts it back when the store refuses; the waiting
 * changes are named, the clock's included.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, renderHook, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';

import { describePending } from '../../store/board';
import { clockKeys, openRunsQuery, runsOnDayQuery, useDeleteCrossing, useRecordCrossing } from '../../store/clock';
import { useSession } from '../../store/session';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const COACH = '0190a0b0-0000-7000-8000-0000000000c1';
const RUN = '0190a0b0-0000-7000-8000-0000000000e1';
const DAY = '2026-12-02';

const mockStore = {
  user: COACH as string | null,
  listRunsOnDay: jest.fn(),
  listOpenRuns: jest.fn(),
  recordCrossing: jest.fn(),
  removeCrossings: jest.fn(),
};
jest.mock('../../sync', () => ({
  deviceStore: async () => mockStore,
  localDay: () => '2026-12-02',
}));
const mockNotify = jest.fn();
jest.mock('../../store/sync-status', () => ({ notifyLocalChange: () => mockNotify() }));

const run = (crossings: { id: string; atMs: number; handTimed: boolean }[] = []) => ({
  id: RUN,
  teamId: TEAM,
  heatId: RUN,
  skaterId: RUN,
  day: DAY,
  distanceM: 1500,
  track: 'long',
  lane: 'inner',
  startedAt: '2026-12-02T09:00:00.000Z',
  startOffsetMs: 0,
  targetMs: null,
  status: 'running',
  stopReason: '',
  note: '',
  createdBy: COACH,
  authorName: 'Anouk Brink',
  createdAt: '2026-12-02T09:00:00.000Z',
  crossings,
});

/** A promise the test settles by hand (a write waiting in the store's queue). */
function deferred<T>() {
  let resolve!: (value: T) => void;
  let reject!: (error: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

async function setup() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const wrapper = ({ children }: { children: ReactNode }) => <QueryClientProvider client={client}>{children}</QueryClientProvider>;
  await client.fetchQuery(runsOnDayQuery(TEAM, DAY));
  return { client, wrapper, cached: () => client.getQueryData<ReturnType<typeof run>[]>(clockKeys.runsOnDay(TEAM, DAY))![0].crossings };
}

beforeEach(() => {
  jest.clearAllMocks();
  mockStore.user = COACH;
  mockStore.listRunsOnDay.mockResolvedValue([run()]);
  mockStore.listOpenRuns.mockResolvedValue([]);
  useSession.setState({ user: { id: COACH, email: 'anouk@example.test', displayName: 'Anouk Brink' } } as never);
});

describe('useRecordCrossing', () => {
  it('paints the crossing before the store is reached, keeps it through a re-read while the write waits, and says a change waits', async () => {
    const { client, wrapper, cached } = await setup();
    const write = deferred<unknown>();
    mockStore.recordCrossing.mockReturnValue(write.promise);
    const { result } = renderHook(() => useRecordCrossing(TEAM), { wrapper });
    act(() => result.current.mutate({ runId: RUN, atMs: 25_310, id: 'c1' }));
    // Synchronously in the tap's frame: no await between the tap and the paint.
    expect(cached()).toEqual([{ id: 'c1', atMs: 25_310, handTimed: false }]);
    await waitFor(() => expect(mockStore.recordCrossing).toHaveBeenCalledWith(expect.objectContaining({ runId: RUN, atMs: 25_310, id: 'c1', userId: COACH })));
    // Another write settles meanwhile and the runs are read again: the store has no c1 yet.
    await act(() => client.refetchQueries({ queryKey: clockKeys.runs(TEAM), type: 'all' }));
    expect(mockStore.listRunsOnDay).toHaveBeenCalledTimes(2);
    expect(cached()).toEqual([{ id: 'c1', atMs: 25_310, handTimed: false }]);
    await act(async () => write.resolve({ id: 'c1' }));
    await waitFor(() => expect(mockNotify).toHaveBeenCalled());
    expect(result.current.isError).toBe(false);
  });

  it('takes the crossing back out when the store refuses it, and says why', async () => {
    const { wrapper, cached } = await setup();
    mockStore.recordCrossing.mockRejectedValue(new Error('That run no longer exists'));
    const { result } = renderHook(() => useRecordCrossing(TEAM), { wrapper });
    act(() => result.current.mutate({ runId: RUN, atMs: 25_310, id: 'c1' }));
    expect(cached().map((c) => c.id)).toEqual(['c1']);
    await waitFor(() => expect(result.current.isError).toBe(true));
    expect(cached()).toEqual([]);
    expect(result.current.error?.message).toBe('That run no longer exists');
    expect(result.current.variables).toMatchObject({ runId: RUN, atMs: 25_310 });
  });

  it('keeps the crossings in time order whatever order they are tapped in', async () => {
    const { wrapper, cached } = await setup();
    mockStore.recordCrossing.mockImplementation(async (c: { id: string }) => c);
    const { result } = renderHook(() => useRecordCrossing(TEAM), { wrapper });
    await act(async () => {
      await result.current.mutateAsync({ runId: RUN, atMs: 54_020, id: 'b' });
      await result.current.mutateAsync({ runId: RUN, atMs: 25_310, id: 'a', handTimed: true });
    });
    expect(cached()).toEqual([
      { id: 'a', atMs: 25_310, handTimed: true },
      { id: 'b', atMs: 54_020, handTimed: false },
    ]);
  });
});

describe('useDeleteCrossing (undo)', () => {
  it('takes the crossing off at once and puts it back when the store refuses', async () => {
    mockStore.listRunsOnDay.mockResolvedValue([run([{ id: 'c1', atMs: 25_310, handTimed: false }])]);
    const { wrapper, cached } = await setup();
    const write = deferred<void>();
    mockStore.removeCrossings.mockReturnValue(write.promise);
    const { result } = renderHook(() => useDeleteCrossing(TEAM), { wrapper });
    act(() => result.current.mutate({ id: 'c1', runId: RUN }));
    await waitFor(() => expect(cached()).toEqual([]));
    mockStore.listRunsOnDay.mockResolvedValue([run([{ id: 'c1', atMs: 25_310, handTimed: false }])]);
    await act(async () => write.reject(new Error('Only the coach who timed this run or the head coach may change it')));
    await waitFor(() => expect(result.current.isError).toBe(true));
    await waitFor(() => expect(cached().map((c) => c.id)).toEqual(['c1']));
  });
});

describe('openRunsQuery', () => {
  it('asks the store for the signed-in coach’s open runs only', async () => {
    const client = new QueryClient();
    await client.fetchQuery(openRunsQuery(TEAM));
    expect(mockStore.listOpenRuns).toHaveBeenCalledWith(TEAM, COACH);
  });
});

describe('what waits to be sent', () => {
  it('names the clock’s changes too (the panel never says nothing waits while lap times do)', () => {
    expect(describePending({ observations: 0, sessions: 0, cues: 0, runs: 2, crossings: 14, targets: 1 })).toBe('2 timed runs, 14 lap times and 1 target waiting to be sent');
    expect(describePending({ observations: 3, sessions: 0, cues: 0, runs: 0, crossings: 1, targets: 0 })).toBe('3 notes and 1 lap time waiting to be sent');
  });
});
