/**
 * The clock screen at the boards (jest-expo/web), with the device store's clock hooks replaced by
 * an in-memory fake and the speech wrapper by a recorder:
 * - Start and the lane buttons take the time from the pointer event's own timestamp;
 * - a second tap on the same lane within 2 s is ignored and said so, while the other lane 0.3 s
 *   later counts;
 * - the lanes show the lap, split, km/h, gap and laps to go of what was tapped;
 * - splits are read aloud one at a time (the second lane's sentence waits for the first);
 * - Undo takes back the lane's last crossing only; Stop keeps the skater's times with the reason;
 * - the last split finishes a skater, and the heat ends once nobody is running, showing its table.
 */
import { QueryClient, QueryClientProvider, notifyManager } from '@tanstack/react-query';
import { render, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { ClockScreen } from '../../components/clock/clock-screen';
import { useClockUi, initialSetup } from '../../components/clock/use-clock';
import { useSession } from '../../store/session';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

// Cache updates reach the screen inside the act() of the tap that made them (not a timer later).
notifyManager.setScheduler((callback) => callback());

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BRAM = '0190a0b0-0000-7000-8000-0000000000b2';
const USER = '0190a0b0-0000-7000-8000-0000000000cc';

type FakeRun = {
  id: string;
  heatId: string;
  skaterId: string;
  day: string;
  distanceM: number;
  track: 'long' | 'short';
  lane: 'inner' | 'outer' | 'group';
  startedAt: string;
  startOffsetMs: number;
  targetMs: number | null;
  status: 'running' | 'finished' | 'stopped';
  stopReason: string;
  note: string;
  crossings: { id: string; atMs: number; handTimed: boolean }[];
};

const mockDb = { runs: [] as FakeRun[], ids: 0, skewMs: 0 };
const mockCalls = {
  start: jest.fn(),
  record: jest.fn(),
  undo: jest.fn(),
  finish: jest.fn(),
  editRun: jest.fn(),
};
const mockSpeak = jest.fn();
const mockStop = jest.fn();

jest.mock('../../store/speech', () => ({
  speak: (...args: unknown[]) => mockSpeak(...args),
  stop: () => mockStop(),
  canSpeak: () => true,
}));

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

jest.mock('../../store/board', () => ({
  squadOnDevice: () => ({
    queryKey: ['test', 'squad'],
    staleTime: Infinity,
    queryFn: async () => {
      const skaters = [
        { id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: false, retired: false },
        { id: BRAM, displayName: 'Bram Tolsma', groupId: null, hasAccount: false, retired: false },
      ];
      return { groups: [], skaters, everyone: skaters };
    },
  }),
}));

jest.mock('../../store/clock', () => {
  const { useQueryClient } = jest.requireActual('@tanstack/react-query');
  const copy = () => mockDb.runs.map((r) => ({ ...r, crossings: [...r.crossings].sort((a, b) => a.atMs - b.atMs) }));
  const publish = (client: { setQueryData: (key: unknown, data: unknown) => void }) => {
    client.setQueryData(['test', 'day'], copy());
    client.setQueryData(['test', 'open'], copy().filter((r) => r.status === 'running'));
  };
  const change = (runId: string, fn: (r: FakeRun) => FakeRun) => {
    mockDb.runs = mockDb.runs.map((r) => (r.id === runId ? fn(r) : r));
  };
  const hook = (name: keyof typeof mockCalls, apply: (args: never) => unknown) => () => {
    const client = useQueryClient();
    const run = (args: never) => {
      mockCalls[name](args);
      const out = apply(args);
      publish(client);
      return out;
    };
    return { mutate: run, mutateAsync: async (args: never) => run(args), isPending: false };
  };
  return {
    // The store's "now": the device clock corrected by the server's (here: a device 10 min slow).
    correctedNow: async () => Date.now() + mockDb.skewMs,
    runsOnDayQuery: () => ({ queryKey: ['test', 'day'], staleTime: Infinity, queryFn: async () => copy() }),
    openRunsQuery: () => ({ queryKey: ['test', 'open'], staleTime: Infinity, queryFn: async () => copy().filter((r) => r.status === 'running') }),
    targetsQuery: () => ({
      queryKey: ['test', 'targets'],
      staleTime: Infinity,
      queryFn: async () => [
        { id: 't1', teamId: TEAM, skaterId: ANNA, distanceM: 1500, track: 'long', targetMs: 118_000, plan: 'even', openerMs: null, sharesPct: null, note: '', updatedBy: USER },
      ],
    }),
    useSetTarget: () => ({ mutateAsync: jest.fn() }),
    useStartHeat: hook('start', (args: { heatId: string; startedAt: string; day: string; runs: (Partial<FakeRun> & { id: string })[] }) => {
      mockDb.runs = [
        ...args.runs.map((r) => ({
          heatId: args.heatId,
          startedAt: args.startedAt,
          day: args.day,
          status: 'running' as const,
          stopReason: '',
          note: '',
          startOffsetMs: 0,
          targetMs: null,
          crossings: [],
          ...r,
        })) as FakeRun[],
        ...mockDb.runs,
      ];
    }),
    useRecordCrossing: hook('record', (args: { runId: string; atMs: number; handTimed?: boolean }) =>
      change(args.runId, (r) => ({ ...r, crossings: [...r.crossings, { id: `c${(mockDb.ids += 1)}`, atMs: args.atMs, handTimed: !!args.handTimed }] })),
    ),
    useUndoCrossing: hook('undo', (args: { id: string; runId: string }) =>
      change(args.runId, (r) => ({ ...r, crossings: r.crossings.filter((c) => c.id !== args.id) })),
    ),
    useDeleteCrossing: hook('undo', () => undefined),
    useEditCrossing: hook('editRun', () => undefined),
    useFinishRun: hook('finish', (args: { runId: string; status: FakeRun['status']; stopReason?: string }) =>
      change(args.runId, (r) => ({ ...r, status: args.status, stopReason: args.stopReason ?? '' })),
    ),
    useEditRun: hook('editRun', (args: { runId: string; status?: FakeRun['status']; stopReason?: string }) =>
      change(args.runId, (r) => ({ ...r, ...args })),
    ),
  };
});

function renderClock(): ReturnType<typeof render> {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const wrap = ({ children }: { children: ReactNode }) => (
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>{children}</QueryClientProvider>
    </SafeAreaProvider>
  );
  return render(<ClockScreen />, { wrapper: wrap });
}

/** A touch-down on the surface with this event timestamp. */
const touch = (testId: string, timeStamp: number) => fireWeb(getByTestIdWeb(testId), 'onPointerDown', { timeStamp, nativeEvent: { timeStamp }, button: 0 });

const GUN = 5_000;
const text = (id: string) => textOf(getByTestIdWeb(id));

async function startPair() {
  renderClock();
  await waitFor(() => getByTestIdWeb('clock-setup'));
  await fireWeb(getByTestIdWeb(`setup-skater-${ANNA}`), 'onPress');
  await fireWeb(getByTestIdWeb(`setup-skater-${BRAM}`), 'onPress');
  await waitFor(() => expect(text(`setup-target-${ANNA}`)).toBe('Target 1:58.00, even pace'));
  await touch('clock-start', GUN);
  await waitFor(() => getByTestIdWeb('lane-tap-inner'));
}

describe('ClockScreen', () => {
  beforeEach(() => {
    mockDb.runs = [];
    mockDb.skewMs = 0;
    Object.values(mockCalls).forEach((fn) => fn.mockReset());
    mockSpeak.mockReset();
    mockStop.mockReset();
    useClockUi.setState({ setup: { ...initialSetup }, live: null, lastTap: {}, notice: null, voiceOn: true, shownHeatId: null, resumeChecked: false });
    useSession.setState({
      status: 'signedIn',
      offline: false,
      user: { id: USER, email: 'c@example.test', displayName: 'Tjitske Hoogland' } as never,
      memberships: [{ teamId: TEAM, teamName: 'Test Club', role: 'head_coach', skaterId: null } as never],
      activeTeamId: TEAM,
    });
  });

  it('starts a pair on the touch-down: Anna inner, Bram outer, with the target as a snapshot', async () => {
    await startPair();
    expect(mockCalls.start).toHaveBeenCalledTimes(1);
    const args = mockCalls.start.mock.calls[0][0];
    expect(args.runs.map((r: FakeRun) => [r.skaterId, r.lane, r.distanceM, r.track, r.targetMs, r.startOffsetMs])).toEqual([
      [ANNA, 'inner', 1500, 'long', 118_000, 0],
      [BRAM, 'outer', 1500, 'long', null, 0],
    ]);
    expect(useClockUi.getState().live?.startPerfTs).toBe(GUN);
    expect(text('lane-inner-name')).toBe('Anna Reede');
    expect(text('lane-outer-name')).toBe('Bram Tolsma');
    expect(text('lane-inner-togo')).toBe('Opener + 3 laps');
  });

  it('takes crossings from the event timestamp; a same-lane second tap within 2 s is ignored, the other lane 0.3 s later counts', async () => {
    await startPair();
    await touch('lane-tap-inner', GUN + 24_310);
    await touch('lane-tap-outer', GUN + 24_610);
    await touch('lane-tap-inner', GUN + 24_310 + 400);
    expect(mockCalls.record.mock.calls.map((c) => c[0])).toEqual([
      { runId: expect.any(String), atMs: 24_310 },
      { runId: expect.any(String), atMs: 24_610 },
    ]);
    expect(text('clock-notice-ignored')).toBe('Second tap for Anna within 2 s: ignored as a double tap.');
    await waitFor(() => expect(text('lane-inner-lap')).toBe('24.31'));
    expect(text('lane-inner-split')).toBe('24.31');
    expect(text('lane-inner-kmh')).toBe('44.43');
    expect(text('lane-inner-gap-text')).toBe('+0.71');
    expect(text('lane-inner-gap')).toContain('behind');
    expect(text('lane-inner-togo')).toBe('3 laps to go');
    expect(text('lane-inner-predicted')).toBe('1:58.71');
    // Bram has no target: no gap, and the screen says why.
    expect(text('lane-outer-lap')).toBe('24.61');
    expect(text('lane-outer-no-target')).toBe('No target set: no gap');
    // A tap 2 s after the last one on the same lane counts again.
    await touch('lane-tap-inner', GUN + 24_310 + 2_000);
    expect(mockCalls.record).toHaveBeenCalledTimes(3);
  });

  it('gun from the far side: the sound delay (299 ms for 100 m of 5 °C air) is stored with the run and added to every crossing', async () => {
    renderClock();
    await waitFor(() => getByTestIdWeb('clock-setup'));
    await fireWeb(getByTestIdWeb(`setup-skater-${ANNA}`), 'onPress');
    await fireWeb(getByTestIdWeb('setup-offset-gun'), 'onPress');
    await fireWeb(getByTestIdWeb('setup-gun-distance'), 'onChangeText', '100');
    expect(text('setup-gun-offset')).toContain('Adds 0.29 s');
    expect(text('setup-gun-offset')).toContain('334 m/s');
    await touch('clock-start', GUN);
    await waitFor(() => getByTestIdWeb('lane-tap-inner'));
    expect(mockCalls.start.mock.calls[0][0].runs[0].startOffsetMs).toBe(299);
    await touch('lane-tap-inner', GUN + 24_011);
    expect(mockCalls.record).toHaveBeenLastCalledWith({ runId: expect.any(String), atMs: 24_310 });
  });

  it('a reload mid-race: the open heat comes back with its crossings, its clock rebuilt from the stored start in the store’s time', async () => {
    // The device runs 10 minutes slow; the store keeps instants in the server's time.
    mockDb.skewMs = 600_000;
    const startedAt = new Date(Date.now() + mockDb.skewMs - 60_000).toISOString();
    const base = { heatId: 'heat-1', day: '2026-12-02', distanceM: 1500, track: 'long' as const, startedAt, startOffsetMs: 0, status: 'running' as const, stopReason: '', note: '' };
    mockDb.runs = [
      { ...base, id: '0190a0b0-0000-7000-8000-0000000000e1', skaterId: ANNA, lane: 'inner', targetMs: 118_000, crossings: [{ id: 'x1', atMs: 24_310, handTimed: false }, { id: 'x2', atMs: 55_930, handTimed: false }] },
      { ...base, id: '0190a0b0-0000-7000-8000-0000000000e2', skaterId: BRAM, lane: 'outer', targetMs: null, crossings: [{ id: 'x3', atMs: 24_610, handTimed: false }] },
    ];
    renderClock();
    await waitFor(() => getByTestIdWeb('lane-tap-inner'));
    const live = useClockUi.getState().live!;
    expect(live.resumed).toBe(true);
    // About a minute into the heat, not ten minutes off.
    const elapsed = performance.now() - live.startPerfTs;
    expect(elapsed).toBeGreaterThanOrEqual(60_000);
    expect(elapsed).toBeLessThan(65_000);
    expect(text('clock-resumed')).toContain('Resumed');
    expect(text('lane-inner-lap')).toBe('31.62');
    expect(text('lane-inner-togo')).toBe('2 laps to go');
    expect(text('lane-outer-lap')).toBe('24.61');
    // The setup comes back too, for the next repetition.
    expect(useClockUi.getState().setup).toMatchObject({ distanceM: 1500, track: 'long', mode: 'pair', inner: ANNA, outer: BRAM });
    await touch('lane-tap-inner', live.startPerfTs + 87_410);
    expect(mockCalls.record).toHaveBeenLastCalledWith({ runId: '0190a0b0-0000-7000-8000-0000000000e1', atMs: 87_410 });
  });

  it('reads the splits aloud one at a time: the second lane waits for the first sentence', async () => {
    await startPair();
    await touch('lane-tap-inner', GUN + 24_310);
    await touch('lane-tap-outer', GUN + 24_610);
    expect(mockSpeak).toHaveBeenCalledTimes(1);
    expect(mockSpeak.mock.calls[0][0]).toBe('Anna, opener, twenty-four three, plus seven tenths');
    mockSpeak.mock.calls[0][1].onEnd('done');
    expect(mockSpeak).toHaveBeenCalledTimes(2);
    expect(mockSpeak.mock.calls[1][0]).toBe('Bram, opener, twenty-four six');
  });

  it('with the voice switched off nothing is read', async () => {
    await startPair();
    await fireWeb(getByTestIdWeb('clock-voice'), 'onPress');
    await touch('lane-tap-inner', GUN + 24_310);
    expect(mockSpeak).not.toHaveBeenCalled();
    expect(useClockUi.getState().voiceOn).toBe(false);
  });

  it('Undo takes back only that lane’s last crossing', async () => {
    await startPair();
    await touch('lane-tap-inner', GUN + 24_310);
    await touch('lane-tap-outer', GUN + 24_610);
    await touch('lane-tap-inner', GUN + 55_930);
    await waitFor(() => expect(text('lane-inner-lap')).toBe('31.62'));
    const innerLast = mockDb.runs.find((r) => r.skaterId === ANNA)!.crossings[1].id;
    await fireWeb(getByTestIdWeb('lane-inner-undo'), 'onPress');
    expect(mockCalls.undo).toHaveBeenCalledWith({ id: innerLast, runId: expect.any(String) });
    await waitFor(() => expect(text('lane-inner-lap')).toBe('24.31'));
    expect(text('lane-outer-lap')).toBe('24.61');
    expect(text('clock-notice-info')).toBe('Undone: Anna’s Lap 1 (55.93).');
    // The lane can be tapped again at once (the undone tap no longer blocks it).
    await touch('lane-tap-inner', GUN + 55_950);
    expect(mockCalls.record).toHaveBeenLastCalledWith({ runId: expect.any(String), atMs: 55_950 });
  });

  it('Stop keeps the times with the reason; the last split finishes the other; then the heat ends with its table', async () => {
    await startPair();
    await touch('lane-tap-outer', GUN + 24_610);
    await fireWeb(getByTestIdWeb('lane-outer-stop'), 'onPress');
    await fireWeb(getByTestIdWeb('lane-outer-reason-fall'), 'onPress');
    expect(mockCalls.finish).toHaveBeenCalledWith({ runId: expect.any(String), status: 'stopped', stopReason: 'Fall' });
    await waitFor(() => expect(text('lane-outer-status')).toBe('\u25A0 Stopped: Fall'));
    expect(text('lane-outer-lap')).toBe('24.61');
    expect(queryByTestIdWeb('lane-tap-outer')).toBeNull();

    // Laps come 30 s apart: the screen has painted each crossing before the next tap.
    for (const [at, lap] of [[24_310, '24.31'], [55_930, '31.62'], [87_410, '31.48']] as const) {
      await touch('lane-tap-inner', GUN + at);
      await waitFor(() => expect(text('lane-inner-lap')).toBe(lap));
    }
    expect(mockCalls.finish).toHaveBeenCalledTimes(1);
    await touch('lane-tap-inner', GUN + 118_950);
    expect(mockCalls.finish).toHaveBeenLastCalledWith({ runId: expect.any(String), status: 'finished' });
    await waitFor(() => getByTestIdWeb('clock-last-heat'));
    expect(useClockUi.getState().live).toBeNull();
    expect(text('run-inner-status')).toBe('\u2713 Finished in 1:58.95');
    expect(text('run-inner-row-3-split')).toBe('1:58.95');
    expect(text('run-inner-row-3-gap')).toBe('+0.95');
    expect(text('run-outer-status')).toBe('\u25A0 Stopped: Fall');
    expect(text('run-outer-row-0-lap')).toBe('24.61');
  });
});
