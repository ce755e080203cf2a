/**
 * The review's Lap times section against a faked API answering like server/routes/review-laps.ts
 * (the figures of tests/integration/review-laps.test.ts): the chart draws one point per finish of
 * a complete run and says what it shows; its text alternative lists every run; tapping, focusing
 * or hovering a point shows the run; the side-by-side compares two runs lap by lap with B − A;
 * a section shows the laps of stopped and partial runs, saying so; empty states say what to do.
 *
 *   R1 Tue 6 Oct   finished 1:51.45  laps 25.31 28.71 28.88 28.55
 *   R2 Tue 20 Oct  finished 1:52.02  laps 25.10 28.80 29.20 28.92
 *   R3 Sun 8 Nov (23:30 Chicago) finished 1:50.60  laps 24.90 28.50 28.55 28.65  (PB)
 *   R4 Tue 10 Nov  finished, 3 of 4 crossings: laps 24.80 28.20 56.00, no finish
 *   R5 Tue 10 Nov  stopped after 2: laps 25.50 29.30
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import type { ReactTestInstance } from 'react-test-renderer';

import { LapTrendsSection } from '../../components/review/laps/lap-trends-section';
import type { LapRun, LapTrend } from '../../shared/schemas/review-laps';
import type { Skater } from '../../shared/schemas/team';
import { weeksBetween } from '../../shared/weeks';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const R = (n: number) => `0190a0b0-0000-7000-8000-00000000100${n}`;

const skaters: Skater[] = [
  { id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: false, retired: false },
  { id: BEREND, displayName: 'Berend Visser', groupId: null, hasAccount: false, retired: false },
] as Skater[];

function run(n: number, startedAt: string, day: string, week: string, crossingsMs: number[], extra: Partial<LapRun> = {}): LapRun {
  const lapsMs = crossingsMs.map((c, i) => c - (i === 0 ? 0 : crossingsMs[i - 1]));
  const complete = crossingsMs.length === 4 && (extra.status ?? 'finished') === 'finished';
  return {
    id: R(n),
    startedAt,
    day,
    week,
    status: 'finished',
    stopReason: '',
    state: complete ? 'complete' : 'partial',
    lane: 'inner',
    note: '',
    authorName: 'Marit Tweede',
    targetMs: 110_000,
    crossingsMs,
    lapsMs,
    finishMs: complete ? crossingsMs[3] : null,
    handTimed: false,
    ...extra,
  };
}

const trend: LapTrend = {
  timeZone: 'America/Chicago',
  from: '2026-W38',
  to: '2026-W49',
  weeks: weeksBetween('2026-W38', '2026-W49'),
  skaterId: ANNA,
  distanceM: 1500,
  track: 'long',
  splitsAtM: [300, 700, 1100, 1500],
  openerM: 300,
  distances: [
    { distanceM: 1500, track: 'long', runs: 5, lastDay: '2026-11-10' },
    { distanceM: 500, track: 'long', runs: 1, lastDay: '2026-11-03' },
  ],
  target: { targetMs: 110_000, plan: 'even', openerMs: null, sectionsMs: [22_000, 29_333, 29_333, 29_334], note: '' },
  runs: [
    run(1, '2026-10-06T16:00:00.000Z', '2026-10-06', '2026-W41', [25_310, 54_020, 82_900, 111_450]),
    run(2, '2026-10-20T16:00:00.000Z', '2026-10-20', '2026-W43', [25_100, 53_900, 83_100, 112_020]),
    run(3, '2026-11-09T05:30:00.000Z', '2026-11-08', '2026-W45', [24_900, 53_400, 81_950, 110_600]),
    run(4, '2026-11-10T17:00:00.000Z', '2026-11-10', '2026-W46', [24_800, 53_000, 109_000]),
    run(5, '2026-11-10T18:00:00.000Z', '2026-11-10', '2026-W46', [25_500, 54_800], { status: 'stopped', state: 'stopped', stopReason: 'Fell in the curve' }),
  ],
  bests: {
    finish: { runId: R(3), day: '2026-11-08', ms: 110_600 },
    laps: [
      { runId: R(3), day: '2026-11-08', ms: 24_900 },
      { runId: R(3), day: '2026-11-08', ms: 28_500 },
      { runId: R(3), day: '2026-11-08', ms: 28_550 },
      { runId: R(1), day: '2026-10-06', ms: 28_550 },
    ],
  },
};
const nothing: LapTrend = { ...trend, skaterId: BEREND, distanceM: null, track: null, splitsAtM: [], openerM: 0, distances: [], target: null, runs: [], bests: { finish: null, laps: [] } };

const fetchMock = jest.fn();
const lapUrls = () => fetchMock.mock.calls.map(([url]) => new URL(String(url), 'http://x')).filter((u) => u.pathname.endsWith('/laps'));

beforeEach(() => {
  fetchMock.mockReset();
  fetchMock.mockImplementation((url: string) => {
    const u = new URL(url, 'http://x');
    if (u.pathname.endsWith(`/skaters/${ANNA}/laps`)) return Promise.resolve(fakeResponse(200, trend));
    if (u.pathname.endsWith(`/skaters/${BEREND}/laps`)) return Promise.resolve(fakeResponse(200, nothing));
    return Promise.resolve(fakeResponse(404, { error: { code: 'not_found', message: 'no route' } }));
  });
  global.fetch = fetchMock as unknown as typeof fetch;
});

function renderSection(skaterId: string | null, wide = true) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const onPickSkater = jest.fn();
  const props = { teamId: TEAM, skaters, groups: [], skaterId, group: 'all' as const, onPickSkater, timeZone: 'UTC', wide };
  const utils = render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 1440, height: 900 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <LapTrendsSection {...props} />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
  return { ...utils, onPickSkater };
}

const shown = (id: string) => waitFor(() => getByTestIdWeb(id), { timeout: 5000 });
const text = (id: string) => textOf(getByTestIdWeb(id));
const tap = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');
/** A focus event as react-native-web's Pressable checks it (its target is the pressable's own node: none in the test renderer). */
const focusEvent = { nativeEvent: { target: null } };
const hosts = (match: (node: ReactTestInstance) => boolean) => screen.UNSAFE_root.findAll((n) => typeof n.type === 'string' && match(n));

describe('the chart and its text alternative', () => {
  it('draws the finishes of complete runs, the target and the PB, and lists every run in a table', async () => {
    renderSection(ANNA);
    await shown('laps-chart');
    // The first request asks for the distance run last (none named) and the default weeks.
    expect(lapUrls()).toHaveLength(1);
    expect([...lapUrls()[0].searchParams.keys()]).toEqual([]);

    // Finish: one point (a button) per complete run; the stopped and partial runs have none.
    for (const n of [1, 2, 3]) expect(queryByTestIdWeb(`laps-point-${R(n)}`)).not.toBeNull();
    for (const n of [4, 5]) expect(queryByTestIdWeb(`laps-point-${R(n)}`)).toBeNull();
    expect(getByTestIdWeb(`laps-point-${R(3)}`).props['aria-label']).toBe(
      'Sun 8 Nov 2026 23:30, finish 1:50.60; personal best. Show this run.',
    );
    // Three filled circles for the runs, and one PB ring; the dashed target line with its label.
    const circles = hosts((n) => n.type === 'circle');
    expect(circles.filter((c) => c.props.r === 6 || c.props.r === '6')).toHaveLength(3);
    expect(circles.filter((c) => c.props.r === 10 || c.props.r === '10')).toHaveLength(1);
    expect(hosts((n) => n.type === 'line' && Object.keys(n.props).some((k) => /dasharray/i.test(k)))).toHaveLength(1);
    expect(text('laps-best')).toBe('Personal best: 1:50.60 on Sun 8 Nov 2026 \u00B7 Target: 1:50.00');

    // The drawing is one image whose name says what it shows.
    expect(getByTestIdWeb('laps-chart-image').props['aria-label']).toBe(
      'Finish (1500 m) of Anna Reede, 2026-W38 to 2026-W49: 3 points; fastest 1:50.60 on Sun 8 Nov 2026, latest 1:50.60 on Sun 8 Nov 2026; ' +
        'personal best 1:50.60; target 1:50.00. Every point is listed in the table below.',
    );
    // The table: every run of the weeks, the finish or why there is none, PB and gap to target.
    expect(text(`laps-table-time-${R(1)}`)).toBe('1:51.45');
    expect(text(`laps-table-time-${R(4)}`)).toBe('\u2013');
    expect(text(`laps-table-row-${R(3)}`)).toContain('Personal best; +0.60 on target');
    expect(text(`laps-table-row-${R(2)}`)).toContain('+2.02 on target');
    expect(text(`laps-table-row-${R(4)}`)).toContain('Finished with 3 of 4 crossings: laps shown, no finish time');
    expect(text(`laps-table-row-${R(5)}`)).toContain('Stopped (Fell in the curve) after 2 of 4 crossings: not a finish time');
    expect(getByTestIdWeb('laps-table').props.role).toBe('table');
  });

  it("shows one lap's times, stopped and partial runs' laps off the line and flagged", async () => {
    renderSection(ANNA);
    await shown('laps-chart');
    await tap('laps-measure-1');
    expect(text('laps-chart-heading')).toBe('Lap 1 (400 m) by week');
    // Lap 1 of all five runs; R4 and R5 are drawn as hollow diamonds, not on the line.
    for (const n of [1, 2, 3, 4, 5]) expect(queryByTestIdWeb(`laps-point-${R(n)}`)).not.toBeNull();
    expect(hosts((n) => n.type === 'polygon')).toHaveLength(2);
    expect(getByTestIdWeb(`laps-point-${R(5)}`).props['aria-label']).toBe(
      'Tue 10 Nov 2026 12:00, lap 1 29.30; Stopped (Fell in the curve) after 2 of 4 crossings: not a finish time. Show this run.',
    );
    // Lap 1 target: 29333 ms -> 29.33; best 28.50 (R3).
    expect(text('laps-best')).toBe('Personal best: 28.50 on Sun 8 Nov 2026 \u00B7 Target: 29.33');
    expect(text(`laps-table-time-${R(4)}`)).toBe('28.20');
  });
});

describe('a point shows its run', () => {
  it('on a tap (pinned until closed), on keyboard focus and on hover', async () => {
    renderSection(ANNA);
    await shown('laps-chart');
    expect(queryByTestIdWeb('laps-run-detail')).toBeNull();

    await tap(`laps-point-${R(1)}`);
    expect(text('laps-run-detail-title')).toBe('Tue 6 Oct 2026, 11:00');
    expect(text('laps-run-detail')).toContain('Week 2026-W41 \u00B7 timed by Marit Tweede \u00B7 inner lane');
    expect(text('laps-run-detail-finish')).toBe('Finish 1:51.45');
    // Laps with km/h and the gap to the plan: opener 300 m in 25.31 = 300 x 3.6 / 25.31 = 42.67
    // km/h, against 22.00 planned = +3.31; lap 3 400 m in 28.55 = 50.44 km/h, 29.334 planned = -0.78.
    expect(text('laps-run-detail')).toContain('Opener25.3142.67 km/h+3.31 on plan');
    expect(text('laps-run-detail')).toContain('Lap 328.5550.44 km/h\u22120.78 on plan');
    // 1500 m in 1:51.45: 1500 x 3.6 / 111.45 = 48.45 km/h.
    expect(text('laps-run-detail-speed')).toBe('Average 48.45 km/h');
    expect(getByTestIdWeb(`laps-point-${R(1)}`).props['aria-pressed']).toBe(true);

    // Focus shows another run while it has focus; blur goes back to the pinned one.
    await fireWeb(getByTestIdWeb(`laps-point-${R(3)}`), 'onFocus', focusEvent);
    expect(text('laps-run-detail-title')).toBe('Sun 8 Nov 2026, 23:30');
    await fireWeb(getByTestIdWeb(`laps-point-${R(3)}`), 'onBlur', focusEvent);
    expect(text('laps-run-detail-title')).toBe('Tue 6 Oct 2026, 11:00');
    await fireWeb(getByTestIdWeb(`laps-point-${R(2)}`), 'onHoverIn');
    expect(text('laps-run-detail-finish')).toBe('Finish 1:52.02');
    await fireWeb(getByTestIdWeb(`laps-point-${R(2)}`), 'onHoverOut');

    await tap('laps-run-detail-close');
    expect(queryByTestIdWeb('laps-run-detail')).toBeNull();
  });
});

describe('two runs side by side', () => {
  it('compares the latest two complete runs by default, then the ones picked, with B − A per lap', async () => {
    renderSection(ANNA);
    await shown('laps-compare-table');
    // A = R2 (20 Oct), B = R3 (8 Nov). Opener 24.90 - 25.10 = -0.20; lap 2 28.55 - 29.20 = -0.65;
    // finish 1:50.60 - 1:52.02 = -1.42.
    expect(text('laps-compare-which')).toBe('A: Tue 20 Oct 11:00 \u00B7 B: Sun 8 Nov 23:30');
    expect(text('laps-compare-a-finish')).toBe('1:52.02');
    expect(text('laps-compare-b-finish')).toBe('1:50.60');
    expect(text('laps-compare-diff-0')).toBe('\u22120.20');
    expect(text('laps-compare-diff-2')).toBe('\u22120.65');
    expect(text('laps-compare-diff-finish')).toBe('\u22121.42');

    // A = R1: lap 3 28.65 - 28.55 = +0.10 (slower); finish 1:50.60 - 1:51.45 = -0.85.
    await tap(`laps-compare-a-${R(1)}`);
    expect(text('laps-compare-diff-3')).toBe('+0.10');
    expect(text('laps-compare-diff-finish')).toBe('\u22120.85');
    // B = the stopped R5: its two laps compare, the rest and the finish cannot.
    await tap(`laps-compare-b-${R(5)}`);
    expect(text('laps-compare-diff-1')).toBe('+0.59'); // 29.30 - 28.71
    expect(text('laps-compare-diff-2')).toBe('\u2013');
    expect(text('laps-compare-b-finish')).toBe('\u2013');
    expect(text('laps-compare')).toContain('Run B: Stopped (Fell in the curve) after 2 of 4 crossings: not a finish time.');
  });
});

describe('choices and empty states', () => {
  it('asks for another distance with its track', async () => {
    renderSection(ANNA);
    await shown('laps-distance-500-long');
    expect(text('laps-distance-1500-long')).toBe('\u2713 1500 m \u00B7 long track (5 runs)');
    await tap('laps-distance-500-long');
    await waitFor(() => expect(lapUrls()).toHaveLength(2));
    expect(Object.fromEntries(lapUrls()[1].searchParams)).toEqual({ distanceM: '500', track: 'long' });
  });

  it('says what to do when the skater has no runs, and asks for a skater first', async () => {
    const { onPickSkater } = renderSection(null);
    expect(text('laps-pick-skater')).toMatch(/Pick a skater/);
    await tap(`review-skater-${BEREND}`);
    expect(onPickSkater).toHaveBeenCalledWith(BEREND);
  });

  it('tells a coach to time a run when there is none', async () => {
    renderSection(BEREND);
    await shown('laps-empty');
    expect(text('laps-empty')).toBe('No timed runs for Berend Visser yet. Time a 1500 m with the clock to see it here.');
  });

  it('stacks on a phone: the skater in one line with a way to change it', async () => {
    renderSection(ANNA, false);
    await shown('laps-chart');
    expect(text('laps-who')).toContain('Skater: Anna Reede');
    expect(queryByTestIdWeb('laps-compare-table')).not.toBeNull();
    await tap('laps-change-skater');
    expect(queryByTestIdWeb(`review-skater-${BEREND}`)).not.toBeNull();
  });
});
