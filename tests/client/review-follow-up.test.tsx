/**
 * The review's Cue follow-up section against a faked API answering like
 * server/routes/review-follow-up.ts (the figures of tests/integration/review-follow-up.test.ts):
 * pick a skater, see each stressed cue with its verdict AND its counts in the same sentence, the
 * week rows (good / marks, mean lap with its runs, "to come"), the threshold stepper asking again
 * and stopping at 1, the rule written out, and errors in words.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor } from '@testing-library/react-native';
import { useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { FollowUpSection } from '../../components/review/follow-up/follow-up-section';
import type { FollowUpItem, FollowUpReply, GroupFollowUpReply } from '../../shared/schemas/review-follow-up';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const SIT = '0190a0b0-0000-7000-8000-0000000000f1';
const LOOK = '0190a0b0-0000-7000-8000-0000000000f3';

const noLaps = { runs: 0, laps: 0, meanLapMs: null };
const fading: FollowUpItem = {
  cueId: SIT, phase: 'straight', label: 'Sit lower', archived: false,
  week: '2026-W06', needsWork: 3, good: 1, laps: { runs: 1, laps: 3, meanLapMs: 28_713 },
  after: [
    { week: '2026-W07', needsWork: 1, good: 2, counted: true, laps: { runs: 1, laps: 3, meanLapMs: 28_333 } },
    { week: '2026-W08', needsWork: 0, good: 0, counted: true, laps: noLaps },
    { week: '2026-W09', needsWork: 0, good: 2, counted: true, laps: { runs: 1, laps: 3, meanLapMs: 29_333 } },
    { week: '2026-W10', needsWork: 1, good: 0, counted: true, laps: noLaps },
  ],
  afterLaps: { runs: 2, laps: 6, meanLapMs: 28_833 }, lapChangeMs: 120,
  verdict: 'fading', stressedGood: 1, stressedMarks: 4, afterGood: 4, afterMarks: 6, weeksCounted: 4, changePoints: 41.7,
};
const unknown: FollowUpItem = {
  cueId: LOOK, phase: 'curve', label: 'Look ahead', archived: false,
  week: '2026-W48', needsWork: 3, good: 0, laps: noLaps,
  after: [
    { week: '2026-W49', needsWork: 0, good: 1, counted: true, laps: noLaps },
    { week: '2026-W50', needsWork: 0, good: 0, counted: false, laps: noLaps },
    { week: '2026-W51', needsWork: 0, good: 0, counted: false, laps: noLaps },
    { week: '2026-W52', needsWork: 0, good: 0, counted: false, laps: noLaps },
  ],
  afterLaps: noLaps, lapChangeMs: null,
  verdict: 'not enough data', stressedGood: 0, stressedMarks: 3, afterGood: 1, afterMarks: 1, weeksCounted: 1, changePoints: 100,
};
const reply = (threshold: number): FollowUpReply => ({
  timeZone: 'America/Toronto', from: '2026-W02', to: '2026-W49', threshold, currentWeek: '2026-W49',
  lapBasis: { distanceM: 1500, track: 'long', runs: 3 },
  items: threshold <= 3 ? [unknown, fading] : [],
});

const groupReply: GroupFollowUpReply = {
  timeZone: 'America/Toronto', from: '2026-W02', to: '2026-W49', threshold: 3, currentWeek: '2026-W49', group: 'all',
  skaters: [
    { skaterId: ANNA, displayName: 'Anna Reede', lapBasis: { distanceM: 1500, track: 'long', runs: 3 }, items: [fading] },
    // The same cue and week for another skater: the cards keep apart.
    // Berend's fault is still marked: persisting.
    {
      skaterId: BEREND,
      displayName: 'Berend Visser',
      lapBasis: null,
      items: [
        {
          ...fading,
          laps: noLaps,
          after: [
            { week: '2026-W07', needsWork: 2, good: 1, counted: true, laps: noLaps },
            { week: '2026-W08', needsWork: 0, good: 0, counted: true, laps: noLaps },
            { week: '2026-W09', needsWork: 1, good: 0, counted: true, laps: noLaps },
            { week: '2026-W10', needsWork: 1, good: 1, counted: true, laps: noLaps },
          ],
          afterLaps: noLaps,
          lapChangeMs: null,
          verdict: 'persisting',
          afterGood: 2,
          afterMarks: 6,
          changePoints: 8.3,
        },
      ],
    },
  ],
};

const skaters = [
  { id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: false, retired: false },
  { id: BEREND, displayName: 'Berend Visser', groupId: null, hasAccount: true, retired: false },
];

const fetchMock = jest.fn();
const followUpUrls = () => fetchMock.mock.calls.map(([u]) => new URL(String(u), 'http://x')).filter((u) => u.pathname.endsWith('/follow-up'));
let failWith: { status: number; body: unknown } | null = null;

beforeEach(() => {
  failWith = null;
  fetchMock.mockReset();
  fetchMock.mockImplementation((url: string) => {
    const u = new URL(url, 'http://x');
    if (failWith) return Promise.resolve(fakeResponse(failWith.status, failWith.body));
    if (u.pathname.includes('/groups/')) return Promise.resolve(fakeResponse(200, groupReply));
    if (u.pathname.endsWith('/follow-up')) return Promise.resolve(fakeResponse(200, reply(Number(u.searchParams.get('threshold')))));
    return Promise.resolve(fakeResponse(404, { error: { code: 'not_found', message: 'no route' } }));
  });
  global.fetch = fetchMock as unknown as typeof fetch;
});

function Harness({ wide }: { wide: boolean }) {
  const [skaterId, setSkaterId] = useState<string | null>(null);
  return (
    <FollowUpSection
      teamId={TEAM}
      skaters={skaters}
      groups={[]}
      skaterId={skaterId}
      group="all"
      onPickSkater={setSkaterId}
      timeZone="America/Toronto"
      wide={wide}
    />
  );
}

function renderSection(wide = true) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 1440, height: 900 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <Harness wide={wide} />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

const shown = (id: string) => waitFor(() => getByTestIdWeb(id), { timeout: 5000 });
const tap = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');
const text = (id: string) => textOf(getByTestIdWeb(id));
const item = (i: FollowUpItem) => `follow-up-item-${i.cueId}-${i.week}`;

describe('cue follow-up', () => {
  it('asks nothing until a skater is picked, then shows each stressed cue with its verdict and counts', async () => {
    renderSection();
    expect(text('follow-up-pick-skater')).toMatch(/Pick a skater/);
    expect(followUpUrls()).toHaveLength(0);
    await tap(`review-skater-${ANNA}`);
    await shown(item(fading));
    const [url] = followUpUrls();
    expect(url.pathname).toBe(`/api/teams/${TEAM}/review/skaters/${ANNA}/follow-up`);
    expect(url.searchParams.get('threshold')).toBe('3');
    expect(text('follow-up-heading')).toBe('Follow-up: Anna Reede');
    expect(text('follow-up-summary')).toMatch(/^2 stressed cue-weeks between 2026-W02 and 2026-W49 \(3 or more/);

    // The verdict never without its counts: both in the same box.
    expect(text(`${item(fading)}-verdict`)).toBe(
      '\u2193 Fault fading4 good of 6 marks in the next 4 weeks (67 %), against 1/4 (25 %) in the stressed week, +41.7 points.',
    );
    expect(text(`${item(fading)}-stressed`)).toMatch(/^Stressed in 2026-W06 \(Mon 2 Feb – Sun 8 Feb 2026\): 3 needs work, 1 good\.$/);
    expect(text(`${item(fading)}-week-2026-W06-marks`)).toBe('1/4 good (25 %)');
    expect(text(`${item(fading)}-week-2026-W07-marks`)).toBe('2/3 good (67 %)');
    expect(text(`${item(fading)}-week-2026-W08-marks`)).toBe('no marks');
    expect(text(`${item(fading)}-week-2026-W07-laps`)).toBe('28.33 (1 run)');
    expect(text(`${item(fading)}-week-2026-W08-laps`)).toBe('no runs');
    expect(text(`${item(fading)}-laps`)).toBe(
      'Mean lap at 1500 m long track, opener left out: stressed week 28.71 (1 run); after 28.83 (2 runs): 0.12 s slower per lap.',
    );
    expect(text('follow-up-basis')).toMatch(/^Lap times are of 1500 m long track: Anna Reede’s most-timed distance .*\(3 fully timed runs\)\.$/);

    // Not enough data: still with its counts, and the weeks that have not begun say so.
    expect(text(`${item(unknown)}-verdict`)).toBe(
      '\u2013 Not enough data1 good of 1 mark in 1 of the next 4 weeks so far (100 %); 3 marks are needed for a verdict.',
    );
    expect(text(`${item(unknown)}-week-2026-W50-marks`)).toBe('to come');
    expect(text(`${item(unknown)}-laps`)).toBe('Mean lap at 1500 m long track, opener left out: no runs in the stressed week or after.');
    // Newest stressed week first, as the server ordered them.
    const order = screen.UNSAFE_root
      .findAll((n) => typeof n.type === 'string' && /^follow-up-item-[^-]+-[^-]+-[^-]+-[^-]+-[^-]+-\d{4}-W\d{2}$/.test(n.props['data-testid'] ?? ''))
      .map((n) => n.props['data-testid']);
    expect(order).toEqual([item(unknown), item(fading)]);
    // The rule is on screen.
    expect(text('follow-up-rule')).toMatch(
      /at least N “needs work” marks.*next 4 weeks.*fewer than 3 marks.*15 points or more.*or no “needs work” mark at all.*fault fading; otherwise.*fault persisting\./,
    );
  });

  it('the stepper asks again with the new threshold, and stops at 1', async () => {
    renderSection(false);
    await tap(`review-skater-${ANNA}`);
    await shown(item(fading));
    // On a phone the list folds to one line once a skater is picked.
    expect(text('follow-up-who')).toContain('Skater: Anna Reede');
    await tap('follow-up-threshold-up');
    await waitFor(() => expect(text('follow-up-summary')).toMatch(/^No cue got 4 or more/));
    expect(followUpUrls().map((u) => u.searchParams.get('threshold'))).toEqual(['3', '4']);
    expect(text('follow-up-threshold-value')).toBe('4');
    expect(queryByTestIdWeb(item(fading))).toBeNull();
    for (let i = 0; i < 3; i += 1) await tap('follow-up-threshold-down');
    expect(text('follow-up-threshold-value')).toBe('1');
    expect(getByTestIdWeb('follow-up-threshold-down').props['aria-disabled']).toBe(true);
    await tap('follow-up-threshold-down');
    expect(text('follow-up-threshold-value')).toBe('1');
  });

  it('the whole group lists each skater with a stressed cue, and opens one of them', async () => {
    renderSection();
    await tap('follow-up-mode-group');
    await shown(`follow-up-skater-${BEREND}`);
    const groupUrl = fetchMock.mock.calls.map(([u]) => new URL(String(u), 'http://x')).find((u) => u.pathname.includes('/groups/'))!;
    expect(groupUrl.pathname).toBe(`/api/teams/${TEAM}/review/groups/all/follow-up`);
    expect(groupUrl.searchParams.get('threshold')).toBe('3');
    expect(text('follow-up-heading')).toBe('Follow-up: All skaters');
    expect(text('follow-up-summary')).toMatch(/^2 skaters in All skaters with a stressed cue between 2026-W02 and 2026-W49 \(2 cue-weeks, 3 or more/);
    expect(text(`follow-up-item-${ANNA}-${SIT}-2026-W06-verdict`)).toMatch(/^\u2193 Fault fading4 good of 6 marks/);
    expect(text(`follow-up-item-${BEREND}-${SIT}-2026-W06-laps`)).toBe('Lap times: no fully timed, finished runs in these weeks.');
    expect(text(`follow-up-item-${BEREND}-${SIT}-2026-W06-verdict`)).toBe(
      '\u2192 Fault persisting2 good of 6 marks in the next 4 weeks (33 %), against 1/4 (25 %) in the stressed week, +8.3 points.',
    );
    await tap(`follow-up-open-${BEREND}`);
    await waitFor(() => expect(text('follow-up-heading')).toBe('Follow-up: Berend Visser'));
    expect(followUpUrls().some((u) => u.pathname.endsWith(`/skaters/${BEREND}/follow-up`))).toBe(true);
  });

  it('says what went wrong when the server refuses', async () => {
    failWith = { status: 400, body: { error: { code: 'validation', message: 'threshold must be a whole number from 1 to 20', fields: { threshold: 'x' } } } };
    renderSection();
    await tap(`review-skater-${BEREND}`);
    await shown('follow-up-error');
    expect(text('follow-up-error')).toMatch(/Could not load the follow-up.*threshold must be a whole number from 1 to 20/);
    expect(getByTestIdWeb('follow-up-retry')).toBeTruthy();
  });
});
