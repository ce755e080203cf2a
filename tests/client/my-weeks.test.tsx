/**
 * "My weeks" (components/my-weeks) against a faked API answering like the review routes: the
 * skater's own cue table by week (from GET .../skaters/:own/weeks), a cell's notes with only the
 * shared ones that have words (a private note, blanked by the server, is not an empty row; it is
 * counted in one line), the finished runs grouped by week with their finish time and laps, and a
 * guardian's read-only view of the linked skater with no button that changes anything.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { MyWeeksScreen } from '../../components/my-weeks/my-weeks-screen';
import type { ReviewCell, ReviewMatrix } from '../../shared/schemas/review';
import type { FollowUpReply, RunsByWeekReply } from '../../shared/schemas/review-follow-up';
import { addIsoWeeks, weekOf, weeksBetween } from '../../shared/weeks';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const OWN = '0190a0b0-0000-7000-8000-0000000000a1';
const SIT = '0190a0b0-0000-7000-8000-0000000000f1';
const SHARED = '0190a0b0-0000-7000-8000-000000000101';
const PRIVATE = '0190a0b0-0000-7000-8000-000000000102';
const MARK_ONLY = '0190a0b0-0000-7000-8000-000000000103';
const SESSION = '0190a0b0-0000-7000-8000-000000000201';
const RUN = '0190a0b0-0000-7000-8000-000000000301';
const HEAT = '0190a0b0-0000-7000-8000-000000000302';
const C = (n: number) => `0190a0b0-0000-7000-8000-00000000040${n}`;

let mockRole: 'skater' | 'guardian' = 'skater';
jest.mock('../../store/session', () => ({
  useActiveMembership: () => ({ teamId: '0190a0b0-0000-7000-8000-000000000001', role: mockRole, skaterId: '0190a0b0-0000-7000-8000-0000000000a1', teamName: 'Test' }),
}));
jest.mock('../../store/today', () => ({ useSkaterName: () => 'Wietske Rondbaan' }));

const NOW = weekOf(Date.now(), 'UTC');
const FROM = addIsoWeeks(NOW, -7);
const W = weeksBetween(FROM, NOW);
const matrix: ReviewMatrix = {
  timeZone: 'UTC', from: FROM, to: NOW, weeks: W,
  rows: [{ cueId: SIT, phase: 'start', label: 'Sit lower', archived: false, counts: [{ week: W[5], needsWork: 2, good: 1 }], totalNeedsWork: 2, totalGood: 1, trend: 'not enough data' }],
};
const cell: ReviewCell = {
  timeZone: 'UTC', week: W[5],
  notes: [
    { id: SHARED, createdAt: '2026-10-07T09:00:00.000Z', day: '2026-10-07', authorName: 'Tjitske Hoogland', createdBy: '', mark: 'needs_work', note: 'Knee over the toe', noteShared: true, sessionId: SESSION },
    // The server blanks a private note's text for a skater: it must not show as an empty row.
    { id: PRIVATE, createdAt: '2026-10-06T09:00:00.000Z', day: '2026-10-06', authorName: 'Maarten Kuipers', createdBy: '', mark: 'needs_work', note: '', noteShared: false, sessionId: SESSION },
    { id: MARK_ONLY, createdAt: '2026-10-05T09:00:00.000Z', day: '2026-10-05', authorName: 'Maarten Kuipers', createdBy: '', mark: 'good', note: '', noteShared: true, sessionId: SESSION },
  ],
};
const runs: RunsByWeekReply = {
  timeZone: 'UTC', from: FROM, to: NOW, weeks: W,
  runs: [{
    id: RUN, heatId: HEAT, skaterId: OWN, day: '2026-02-04', week: W[6], distanceM: 1500, track: 'long', lane: 'inner',
    startedAt: '2026-02-04T17:00:00.000Z', startOffsetMs: 0, targetMs: null, status: 'finished', stopReason: '', note: '',
    crossings: [25_310, 54_020, 82_900, 111_450].map((atMs, i) => ({ id: C(i), atMs, handTimed: false })),
  }],
};

const noLaps = { runs: 0, laps: 0, meanLapMs: null };
const followUp: FollowUpReply = {
  timeZone: 'UTC', from: FROM, to: NOW, threshold: 3, currentWeek: NOW, lapBasis: null,
  items: [{
    cueId: SIT, phase: 'start', label: 'Sit lower', archived: false, week: W[2], needsWork: 3, good: 0, laps: noLaps,
    after: [3, 4, 5, 6].map((i) => ({ week: W[i], needsWork: 0, good: i === 5 ? 1 : 0, counted: true, laps: noLaps })),
    afterLaps: noLaps, lapChangeMs: null,
    verdict: 'not enough data', stressedGood: 0, stressedMarks: 3, afterGood: 1, afterMarks: 1, weeksCounted: 4, changePoints: 100,
  }],
};

const fetchMock = jest.fn();
const paths = () => fetchMock.mock.calls.map(([u]) => new URL(String(u), 'http://x').pathname);

beforeEach(() => {
  mockRole = 'skater';
  fetchMock.mockReset();
  fetchMock.mockImplementation((url: string) => {
    const path = new URL(url, 'http://x').pathname;
    if (path.endsWith('/weeks')) return Promise.resolve(fakeResponse(200, matrix));
    if (path.endsWith('/runs-by-week')) return Promise.resolve(fakeResponse(200, runs));
    if (path.endsWith('/follow-up')) return Promise.resolve(fakeResponse(200, followUp));
    if (path.endsWith('/cells')) return Promise.resolve(fakeResponse(200, cell));
    return Promise.resolve(fakeResponse(404, { error: { code: 'not_found', message: 'no route' } }));
  });
  global.fetch = fetchMock as unknown as typeof fetch;
});

function renderScreen() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 800 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <MyWeeksScreen />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

const shown = (id: string) => waitFor(() => getByTestIdWeb(id), { timeout: 5000 });
const text = (id: string) => textOf(getByTestIdWeb(id));
const buttons = () =>
  screen.UNSAFE_root.findAll((n) => typeof n.type === 'string' && n.props.role === 'button').map((n) => String(n.props['aria-label'] ?? textOf(n)));

describe('my weeks', () => {
  it('shows the skater’s own weeks and runs, read from their own skater id', async () => {
    renderScreen();
    await shown('review-matrix');
    expect(text('my-weeks-heading')).toBe('My weeks');
    expect(paths()).toEqual(
      expect.arrayContaining([`/api/teams/${TEAM}/review/skaters/${OWN}/weeks`, `/api/teams/${TEAM}/review/skaters/${OWN}/runs-by-week`]),
    );
    expect(getByTestIdWeb(`review-cell-${SIT}-${W[5]}`).props['aria-label']).toBe(`Sit lower, week ${W[5]}: 2 needs work, 1 good`);
    expect(text('my-weeks-back')).toBe('\u2190 Back to today');
    await shown(`my-weeks-run-${RUN}`);
    expect(text(`my-weeks-run-${RUN}-finish`)).toBe('Finished in 1:51.45');
    expect(text(`my-weeks-run-${RUN}-laps`)).toBe('Laps: Opener 25.31 · Lap 1 28.71 · Lap 2 28.88 · Finish 28.55');
    expect(text(`my-weeks-runs-${W[6]}`)).toMatch(/\(1 run\)/);
    // "Did it stick?": the own follow-up at the default threshold, the verdict with its counts.
    await shown(`follow-up-item-${SIT}-${W[2]}-verdict`);
    expect(paths()).toContain(`/api/teams/${TEAM}/review/skaters/${OWN}/follow-up`);
    expect(text(`follow-up-item-${SIT}-${W[2]}-verdict`)).toBe(
      '\u2013 Not enough data1 good of 1 mark in the next 4 weeks (100 %); 3 marks are needed for a verdict.',
    );
  });

  it('a cell shows only the shared note with words; the private one is counted, not an empty row', async () => {
    renderScreen();
    await shown(`review-cell-${SIT}-${W[5]}`);
    await fireWeb(getByTestIdWeb(`review-cell-${SIT}-${W[5]}`), 'onPress');
    await shown(`my-weeks-note-${SHARED}`);
    expect(text(`my-weeks-note-text-${SHARED}`)).toBe('Knee over the toe');
    expect(text(`my-weeks-note-${SHARED}`)).toContain('From Tjitske Hoogland');
    expect(queryByTestIdWeb(`my-weeks-note-${PRIVATE}`)).toBeNull();
    expect(queryByTestIdWeb(`my-weeks-note-${MARK_ONLY}`)).toBeNull();
    expect(text('my-weeks-notes-others')).toBe('And 2 more marks without a note shared with you.');
    // Nothing here edits a note.
    expect(buttons().filter((b) => /change|edit|delete|save/i.test(b))).toEqual([]);
    await fireWeb(getByTestIdWeb('my-weeks-notes-close'), 'onPress');
    expect(queryByTestIdWeb('my-weeks-notes')).toBeNull();
  });

  it('a guardian reads the linked skater’s weeks, told it is read only, with no button that changes anything', async () => {
    mockRole = 'guardian';
    renderScreen();
    await shown('review-matrix');
    expect(text('my-weeks-heading')).toBe('Wietske’s weeks');
    expect(textOf(screen.UNSAFE_root.findAll((n) => typeof n.type === 'string' && n.props['data-testid'] === 'my-weeks')[0])).toMatch(
      /viewing as a guardian: read only/,
    );
    await fireWeb(getByTestIdWeb(`review-cell-${SIT}-${W[5]}`), 'onPress');
    await shown(`my-weeks-note-${SHARED}`);
    // Only moving through the weeks, opening cells and closing the notes.
    for (const label of buttons()) expect(label).toMatch(/^(← Earlier|Later →|Earlier|Later|Close|Sit lower, week .*|Show the last 8 weeks.*|.*weeks.*)$/);
    expect(buttons().filter((b) => /change|edit|delete|save|got it/i.test(b))).toEqual([]);
  });
});
