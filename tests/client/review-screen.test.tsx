/**
 * The evening review's first view against a faked API answering like server/routes/review.ts:
 * the whole-group matrix (counts per week with their mark shapes, empty weeks as "no marks",
 * trend words, rows under their phase headings in phase order), the range buttons (Earlier asks
 * the 8 weeks before, Later is off at this week and says so), a typed range checked before it is
 * sent, a skater's matrix and the notes behind a cell, the one-week table, the skater list's
 * search and retired switch, and the empty and error states in words.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import type { ReactTestInstance } from 'react-test-renderer';

import { act } from '@testing-library/react-native';

import { ReviewScreen } from '../../components/review/review-screen';
import { useConnectivity } from '../../store/connectivity';
import type { ReviewCell, ReviewMatrix, ReviewWeek } from '../../shared/schemas/review';
import { addIsoWeeks, weekOf, weeksBetween } from '../../shared/weeks';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const CATO = '0190a0b0-0000-7000-8000-0000000000c3';
const JUNIORS = '0190a0b0-0000-7000-8000-0000000000d1';
const SIT = '0190a0b0-0000-7000-8000-0000000000f1';
const ARMS = '0190a0b0-0000-7000-8000-0000000000f2';
const LOOK = '0190a0b0-0000-7000-8000-0000000000f3';
const NOTE1 = '0190a0b0-0000-7000-8000-000000000101';
const NOTE2 = '0190a0b0-0000-7000-8000-000000000102';
const SESSION = '0190a0b0-0000-7000-8000-000000000201';

const mockUpdate = jest.fn(async (..._args: unknown[]) => undefined as unknown);
jest.mock('../../store/board', () => ({
  useUpdateObservation: () => ({ mutateAsync: (...args: unknown[]) => mockUpdate(...args), isPending: false }),
}));
const mockRunSync = jest.fn(async (..._args: unknown[]) => ({}) as unknown);
jest.mock('../../store/sync-status', () => ({
  runSync: (...args: unknown[]) => mockRunSync(...args),
}));

// The head coach unless a test signs in a plain coach (who changes only their own notes).
let mockRole = 'head_coach';
const mockMe = '0190a0b0-0000-7000-8000-0000000000ee';
jest.mock('../../store/session', () => ({
  useActiveMembership: () => ({ teamId: '0190a0b0-0000-7000-8000-000000000001', role: mockRole, teamName: 'Test' }),
  useSession: (pick: (state: { user: { id: string } }) => unknown) => pick({ user: { id: mockMe } }),
}));

// The range the server gives by default: this week (UTC team) and the seven before it.
const NOW = weekOf(Date.now(), 'UTC');
const FROM = addIsoWeeks(NOW, -7);
const W = weeksBetween(FROM, NOW);

function matrix(from: string, to: string, rows: ReviewMatrix['rows']): ReviewMatrix {
  return { timeZone: 'UTC', from, to, weeks: weeksBetween(from, to), rows };
}
// Deliberately out of phase order (curve before start): the screen groups by phase.
const rows: ReviewMatrix['rows'] = [
  {
    cueId: LOOK, phase: 'curve', label: 'Look ahead', archived: false,
    counts: [{ week: W[6], needsWork: 0, good: 1 }], totalNeedsWork: 0, totalGood: 1, trend: 'not enough data',
  },
  {
    cueId: SIT, phase: 'start', label: 'Sit lower', archived: false,
    counts: [
      { week: W[0], needsWork: 3, good: 1 },
      { week: W[3], needsWork: 2, good: 0 },
      { week: W[7], needsWork: 0, good: 2 },
    ],
    totalNeedsWork: 5, totalGood: 3, trend: 'fewer',
  },
  {
    cueId: ARMS, phase: 'start', label: 'Arms quiet', archived: true,
    counts: [{ week: W[5], needsWork: 4, good: 0 }], totalNeedsWork: 4, totalGood: 0, trend: 'more',
  },
];
const squad = {
  groups: [{ id: JUNIORS, name: 'Juniors', sortOrder: 1 }],
  skaters: [
    { id: ANNA, displayName: 'Anna Reede', groupId: JUNIORS, hasAccount: false, retired: false },
    { id: BEREND, displayName: 'Berend Visser', groupId: null, hasAccount: true, retired: false },
    { id: CATO, displayName: 'Cato de Wit', groupId: null, hasAccount: false, retired: true },
  ],
};
const cell: ReviewCell = {
  timeZone: 'UTC',
  week: W[0],
  notes: [
    { id: NOTE1, createdAt: '2026-10-07T09:00:00.000Z', day: '2026-10-07', authorName: 'Tjitske Hoogland', createdBy: '0190a0b0-0000-7000-8000-0000000000aa', mark: 'needs_work', note: 'Sits up in the set', noteShared: true, sessionId: SESSION },
    { id: NOTE2, createdAt: '2026-10-06T09:00:00.000Z', day: '2026-10-06', authorName: 'Maarten Kuipers', createdBy: mockMe, mark: 'good', note: '', noteShared: false, sessionId: SESSION },
  ],
};
const week: ReviewWeek = {
  timeZone: 'UTC',
  week: NOW,
  skaters: [{ id: ANNA, displayName: 'Anna Reede' }],
  cues: [{ cueId: SIT, phase: 'start', label: 'Sit lower', archived: false }],
  cells: [{ skaterId: ANNA, cueId: SIT, needsWork: 0, good: 2 }],
};

type Answer = { status: number; body?: unknown };
let answer: (url: URL) => Answer;
const fetchMock = jest.fn();
const urls = () => fetchMock.mock.calls.map(([url]) => new URL(String(url), 'http://x'));
const reviewUrls = (part: string) => urls().filter((u) => u.pathname.includes(`/review/${part}`));

function defaultAnswer(url: URL): Answer {
  const path = url.pathname;
  if (path.endsWith('/squad')) return { status: 200, body: squad };
  if (path.includes('/review/groups/') || path.includes('/review/skaters/') && path.endsWith('/weeks')) {
    const from = url.searchParams.get('from') ?? FROM;
    const to = url.searchParams.get('to') ?? NOW;
    return { status: 200, body: matrix(from, to, from === FROM ? rows : []) };
  }
  if (path.endsWith('/cells')) return { status: 200, body: cell };
  if (path.includes('/review/week/')) return { status: 200, body: week };
  return { status: 404, body: { error: { code: 'not_found', message: 'no route' } } };
}

/** Requests whose URL holds this never get an answer (a slow rink network). */
let holdPath: string | null = null;

beforeEach(() => {
  holdPath = null;
  mockUpdate.mockReset();
  mockUpdate.mockResolvedValue(undefined);
  mockRunSync.mockReset();
  mockRunSync.mockResolvedValue({});
  fetchMock.mockReset();
  answer = defaultAnswer;
  fetchMock.mockImplementation((url: string) => {
    if (holdPath && url.includes(holdPath)) return new Promise(() => undefined);
    const { status, body } = answer(new URL(url, 'http://x'));
    return Promise.resolve(fakeResponse(status, body));
  });
  global.fetch = fetchMock as unknown as typeof fetch;
});

function renderScreen() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 1440, height: 900 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <ReviewScreen />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

const all = (match: (node: ReactTestInstance) => boolean) => screen.UNSAFE_root.findAll((n) => typeof n.type === 'string' && match(n));
const byLabel = (label: string) => all((n) => n.props['aria-label'] === label)[0] ?? null;
const disabled = (id: string) => getByTestIdWeb(id).props['aria-disabled'] === true;
const tap = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');
const shown = (id: string) => waitFor(() => getByTestIdWeb(id), { timeout: 5000 });
/** The test window is phone-sized: the skater list opens behind "Choose a skater" outside the skater view. */
async function openList() {
  await shown('review-list-toggle');
  expect(textOf(getByTestIdWeb('review-list-toggle'))).toBe('Choose a skater');
  await tap('review-list-toggle');
  await shown(`review-skater-${ANNA}`);
}

describe('the whole-group matrix', () => {
  it('shows the counts per week, empty weeks as no marks, the trend words and the phases in order', async () => {
    renderScreen();
    await shown('review-matrix');
    expect(reviewUrls('groups/all/weeks')).toHaveLength(1);
    expect(textOf(getByTestIdWeb('review-table-heading'))).toBe('Whole group: All skaters');

    // Counts: both marks where both are, each as a figure; a named cell for screen readers.
    expect(textOf(getByTestIdWeb(`review-cell-${SIT}-${W[0]}-nw`))).toBe('3');
    expect(textOf(getByTestIdWeb(`review-cell-${SIT}-${W[0]}-good`))).toBe('1');
    expect(getByTestIdWeb(`review-cell-${SIT}-${W[0]}`).props['aria-label']).toBe(`Sit lower, week ${W[0]}: 3 needs work, 1 good`);
    expect(queryByTestIdWeb(`review-cell-${SIT}-${W[3]}-good`)).toBeNull();
    expect(getByTestIdWeb(`review-cell-${SIT}-${W[3]}`).props['aria-label']).toBe(`Sit lower, week ${W[3]}: 2 needs work, 0 good`);
    // An empty week keeps its column and says so.
    expect(getByTestIdWeb(`review-cell-${SIT}-${W[1]}`).props['aria-label']).toBe(`Sit lower, week ${W[1]}: no marks`);
    expect(getByTestIdWeb(`review-cell-${LOOK}-${W[0]}`).props['aria-label']).toBe(`Look ahead, week ${W[0]}: no marks`);
    // Every week of the range has its column heading, the Monday under the number.
    for (const w of W) expect(textOf(getByTestIdWeb(`review-week-head-${w}`))).toMatch(new RegExp(`^W${w.slice(-2)}\\d{1,2} [A-Z][a-z]{2}$`));

    // Trend: a sign and a word; the rule is written out.
    expect(textOf(getByTestIdWeb(`review-trend-${SIT}`))).toBe('\u2193 fewer');
    expect(textOf(getByTestIdWeb(`review-trend-${ARMS}`))).toBe('\u2191 more');
    expect(textOf(getByTestIdWeb(`review-trend-${LOOK}`))).toBe('\u2013 not enough data');
    expect(textOf(getByTestIdWeb('review-trend-rule'))).toMatch(/last 4 weeks.*4 weeks before.*15 points.*Fewer than 3 marks/);

    // Phases: Start (both its cues, in the server's order) before Curve, whatever the reply's order.
    const order = all((n) => /^review-(phase|row)-/.test(n.props['data-testid'] ?? '')).map((n) => n.props['data-testid']);
    expect(order).toEqual(['review-phase-start', `review-row-${SIT}`, `review-row-${ARMS}`, 'review-phase-curve', `review-row-${LOOK}`]);
    expect(textOf(getByTestIdWeb('review-phase-start'))).toBe('Start');
    expect(textOf(getByTestIdWeb(`review-row-${ARMS}`))).toContain('(archived cue)');
    // A group's counts are sums: its cells are not buttons.
    expect(getByTestIdWeb(`review-cell-${SIT}-${W[0]}`).props.role).toBe('img');
  });

  it('lets a keyboard reach the table that scrolls sideways, even with no cell to open', async () => {
    renderScreen();
    await shown('review-matrix');
    const regions = screen.UNSAFE_root.findAll(
      (node) => typeof node.type === 'string' && /scrolls sideways/.test(String(node.props['aria-label'] ?? '')),
    );
    expect(regions).toHaveLength(1);
    expect(regions[0].props.role).toBe('region');
    expect(String(regions[0].props.tabIndex)).toBe('0');
  });

  it('asks for a group, or skaters in no group, from the chips', async () => {
    renderScreen();
    await shown('review-matrix');
    await shown(`review-group-${JUNIORS}`);
    await tap(`review-group-${JUNIORS}`);
    await waitFor(() => expect(reviewUrls(`groups/${JUNIORS}/weeks`)).toHaveLength(1));
    await tap('review-group-none');
    await waitFor(() => expect(reviewUrls('groups/none/weeks')).toHaveLength(1));
    await waitFor(() => expect(textOf(getByTestIdWeb('review-table-heading'))).toBe('Whole group: No group'));
  });
});

describe('the range', () => {
  it('moves by 8 weeks; Later is off at this week and says so', async () => {
    renderScreen();
    await shown('review-matrix');
    expect(textOf(getByTestIdWeb('review-range-shown'))).toBe(`${FROM} to ${NOW}`);
    expect(disabled('review-later')).toBe(true);
    expect(textOf(getByTestIdWeb('review-later-off'))).toContain(`ends with this week (${NOW})`);
    expect(disabled('review-earlier')).toBe(false);

    await tap('review-earlier');
    const earlierFrom = addIsoWeeks(FROM, -8);
    const earlierTo = addIsoWeeks(NOW, -8);
    await waitFor(() => expect(textOf(getByTestIdWeb('review-range-shown'))).toBe(`${earlierFrom} to ${earlierTo}`));
    const asked = reviewUrls('groups/all/weeks').at(-1)!;
    expect([asked.searchParams.get('from'), asked.searchParams.get('to')]).toEqual([earlierFrom, earlierTo]);
    // Those weeks hold no notes: said in words.
    expect(textOf(getByTestIdWeb('review-empty'))).toBe('No notes in these weeks.');
    expect(disabled('review-later')).toBe(false);
    expect(queryByTestIdWeb('review-later-off')).toBeNull();

    await tap('review-later');
    await waitFor(() => expect(textOf(getByTestIdWeb('review-range-shown'))).toBe(`${FROM} to ${NOW}`));
    expect(disabled('review-later')).toBe(true);
  });

  it('checks a typed range before asking, and asks for a good one', async () => {
    renderScreen();
    await shown('review-range-apply');
    const before = reviewUrls('groups/all/weeks').length;
    await fireWeb(getByTestIdWeb('review-from'), 'onChangeText', '2025-W53');
    await tap('review-range-apply');
    expect(textOf(getByTestIdWeb('review-from-error'))).toMatch(/not a week of that year/);
    await fireWeb(getByTestIdWeb('review-from'), 'onChangeText', '2026-W10');
    await fireWeb(getByTestIdWeb('review-to'), 'onChangeText', '2026-W02');
    await tap('review-range-apply');
    expect(textOf(getByTestIdWeb('review-from-error'))).toMatch(/must not be after/);
    expect(reviewUrls('groups/all/weeks')).toHaveLength(before);

    await fireWeb(getByTestIdWeb('review-to'), 'onChangeText', '2026-w20');
    await tap('review-range-apply');
    await waitFor(() => expect(textOf(getByTestIdWeb('review-range-shown'))).toBe('2026-W10 to 2026-W20'));
    const asked = reviewUrls('groups/all/weeks').at(-1)!;
    expect([asked.searchParams.get('from'), asked.searchParams.get('to')]).toEqual(['2026-W10', '2026-W20']);
  });
});

describe('one skater and the notes behind a cell', () => {
  it('opens a cell: day, coach, mark and text of each note', async () => {
    renderScreen();
    await openList();
    await tap(`review-skater-${ANNA}`);
    await shown('review-matrix');
    expect(reviewUrls(`skaters/${ANNA}/weeks`)).toHaveLength(1);
    expect(textOf(getByTestIdWeb('review-table-heading'))).toBe('Anna Reede');
    // On a phone the pane shrinks to one line once a skater is chosen.
    expect(textOf(getByTestIdWeb('review-who-pane'))).toBe('Skater: Anna ReedeChange skater');
    const button = byLabel(`Sit lower, week ${W[0]}: 3 needs work, 1 good`);
    expect(button?.props.role).toBe('button');

    await fireWeb(button!, 'onPress');
    await shown(`review-note-${NOTE1}`);
    const asked = reviewUrls(`skaters/${ANNA}/cells`)[0];
    expect([asked.searchParams.get('cueId'), asked.searchParams.get('week')]).toEqual([SIT, W[0]]);
    expect(textOf(getByTestIdWeb('review-notes-title'))).toBe('Anna Reede: Sit lower');
    expect(textOf(getByTestIdWeb(`review-note-day-${NOTE1}`))).toBe('Wed 7 Oct 2026');
    expect(textOf(getByTestIdWeb(`review-note-author-${NOTE1}`))).toBe('By Tjitske Hoogland · shared with the skater');
    expect(getByTestIdWeb(`review-note-mark-${NOTE1}`).props['aria-label']).toBe('Needs work');
    expect(textOf(getByTestIdWeb(`review-note-text-${NOTE1}`))).toBe('Sits up in the set');
    expect(getByTestIdWeb(`review-note-mark-${NOTE2}`).props['aria-label']).toBe('Good');
    expect(textOf(getByTestIdWeb(`review-note-author-${NOTE2}`))).toBe('By Maarten Kuipers · coaches only');
    expect(textOf(getByTestIdWeb(`review-note-text-${NOTE2}`))).toBe('(no words, just the mark)');
    expect(textOf(getByTestIdWeb('review-notes-edit-line'))).toMatch(/in Tidy-up/);

    await tap('review-notes-close');
    expect(queryByTestIdWeb('review-notes')).toBeNull();
  });

  it('changes a note in place through the device store, sends it and asks for the counts again', async () => {
    renderScreen();
    await openList();
    await tap(`review-skater-${ANNA}`);
    await shown('review-matrix');
    await fireWeb(byLabel(`Sit lower, week ${W[0]}: 3 needs work, 1 good`)!, 'onPress');
    await shown(`review-note-change-${NOTE2}`);
    const cellsBefore = reviewUrls(`skaters/${ANNA}/cells`).length;
    const weeksBefore = reviewUrls(`skaters/${ANNA}/weeks`).length;

    await tap(`review-note-change-${NOTE2}`);
    await tap(`review-edit-mark-nw-${NOTE2}`);
    await fireWeb(getByTestIdWeb(`review-edit-text-${NOTE2}`), 'onChangeText', 'Knee drifts in');
    await tap(`review-edit-shared-${NOTE2}`);
    await tap(`review-edit-save-${NOTE2}`);
    await shown('review-notes-saved');
    expect(mockUpdate).toHaveBeenCalledWith({
      sessionId: SESSION,
      id: NOTE2,
      patch: { mark: 'needs_work', note: 'Knee drifts in', noteShared: true },
    });
    expect(mockRunSync).toHaveBeenCalledWith(TEAM);
    expect(textOf(getByTestIdWeb('review-notes-saved'))).toContain('Saved and sent');
    await waitFor(() => expect(reviewUrls(`skaters/${ANNA}/cells`).length).toBeGreaterThan(cellsBefore));
    await waitFor(() => expect(reviewUrls(`skaters/${ANNA}/weeks`).length).toBeGreaterThan(weeksBefore));
    expect(queryByTestIdWeb(`review-edit-${NOTE2}`)).toBeNull();
  });

  it("offers a plain coach the change of their own note only, and says why not for another coach's", async () => {
    mockRole = 'coach';
    try {
      renderScreen();
      await openList();
      await tap(`review-skater-${ANNA}`);
      await shown('review-matrix');
      await fireWeb(byLabel(`Sit lower, week ${W[0]}: 3 needs work, 1 good`)!, 'onPress');
      await shown(`review-note-change-${NOTE2}`);
      expect(queryByTestIdWeb(`review-note-change-${NOTE1}`)).toBeNull();
      expect(textOf(getByTestIdWeb(`review-note-readonly-${NOTE1}`))).toBe('Only its author or the head coach can change this note.');
      expect(queryByTestIdWeb(`review-note-readonly-${NOTE2}`)).toBeNull();
    } finally {
      mockRole = 'head_coach';
    }
  });

  it("says why the device refused a change, and says when it waits for the next sync", async () => {
    mockUpdate.mockRejectedValueOnce(new Error("Only the head coach or the note's author can change it"));
    renderScreen();
    await openList();
    await tap(`review-skater-${ANNA}`);
    await shown('review-matrix');
    await fireWeb(byLabel(`Sit lower, week ${W[0]}: 3 needs work, 1 good`)!, 'onPress');
    await shown(`review-note-change-${NOTE1}`);
    await tap(`review-note-change-${NOTE1}`);
    await tap(`review-edit-save-${NOTE1}`);
    expect(textOf(getByTestIdWeb(`review-edit-error-${NOTE1}`))).toBe("Only the head coach or the note's author can change it");
    expect(mockRunSync).not.toHaveBeenCalled();

    mockRunSync.mockResolvedValueOnce(null);
    await tap(`review-edit-save-${NOTE1}`);
    await shown('review-notes-saved');
    expect(textOf(getByTestIdWeb('review-notes-saved'))).toContain('sent with the next sync');
  });

  it("never shows one skater's counts under another's name while they load", async () => {
    renderScreen();
    await openList();
    await tap(`review-skater-${ANNA}`);
    await shown('review-matrix');
    holdPath = `skaters/${BEREND}/weeks`;
    await tap('review-list-toggle');
    await shown(`review-skater-${BEREND}`);
    await tap(`review-skater-${BEREND}`);
    await waitFor(() => expect(textOf(getByTestIdWeb('review-table-heading'))).toBe('Berend Visser'));
    expect(queryByTestIdWeb('review-matrix')).toBeNull();
    expect(textOf(getByTestIdWeb('review-matrix-loading'))).toBe('Loading the counts…');
  });

  it('finds skaters by name and hides retired ones unless asked', async () => {
    renderScreen();
    await openList();
    expect(queryByTestIdWeb(`review-skater-${CATO}`)).toBeNull();
    await tap('review-show-retired');
    expect(getByTestIdWeb(`review-skater-${CATO}`).props['aria-label']).toBe('Cato de Wit (retired)');
    await fireWeb(getByTestIdWeb('review-search'), 'onChangeText', 'vis');
    expect(queryByTestIdWeb(`review-skater-${ANNA}`)).toBeNull();
    expect(getByTestIdWeb(`review-skater-${BEREND}`)).toBeTruthy();
    await fireWeb(getByTestIdWeb('review-search'), 'onChangeText', 'nobody');
    expect(textOf(getByTestIdWeb('review-skaters-empty'))).toBe('No skater matches.');
  });
});

describe('one week', () => {
  it('shows skaters x cues for this week and opens a cell', async () => {
    renderScreen();
    await shown('review-matrix');
    await tap('review-view-week');
    await shown('review-week-grid');
    expect(reviewUrls(`week/${NOW}`)[0].searchParams.get('groupId')).toBe('all');
    expect(textOf(getByTestIdWeb('review-week-shown'))).toBe(`Week ${NOW}`);
    expect(disabled('review-week-after')).toBe(true);
    const button = getByTestIdWeb(`review-wcell-${ANNA}-${SIT}`);
    expect(button.props['aria-label']).toBe(`Anna Reede, Sit lower, week ${NOW}: 0 needs work, 2 good`);
    await fireWeb(button, 'onPress');
    await shown(`review-note-${NOTE1}`);
    expect(reviewUrls(`skaters/${ANNA}/cells`)[0].searchParams.get('week')).toBe(NOW);

    await tap('review-week-before');
    await waitFor(() => expect(reviewUrls(`week/${addIsoWeeks(NOW, -1)}`)).toHaveLength(1));
  });
});

describe('states in words', () => {
  it('says when the counts cannot be loaded, and loads them on Try again', async () => {
    let fail = true;
    answer = (url) => (url.pathname.includes('/review/') && fail ? { status: 503, body: { error: { code: 'unavailable', message: 'The database is not reachable.' } } } : defaultAnswer(url));
    renderScreen();
    await shown('review-matrix-error');
    expect(textOf(getByTestIdWeb('review-matrix-error'))).toContain('Could not load the counts');
    expect(textOf(getByTestIdWeb('review-matrix-error'))).toContain('The database is not reachable.');
    fail = false;
    await tap('review-matrix-retry');
    await shown('review-matrix');
    expect(queryByTestIdWeb('review-matrix-error')).toBeNull();
  });

  it('offline: says the review needs the server and keeps the counts it loaded', async () => {
    renderScreen();
    await shown('review-matrix');
    expect(queryByTestIdWeb('review-offline')).toBeNull();
    await act(async () => useConnectivity.setState({ online: false }));
    expect(textOf(getByTestIdWeb('review-offline'))).toContain('counted on the server, so it needs a connection');
    expect(textOf(getByTestIdWeb('review-offline'))).toContain('loaded last');
    expect(textOf(getByTestIdWeb(`review-cell-${SIT}-${W[0]}-nw`))).toBe('3');
    await act(async () => useConnectivity.setState({ online: true }));
  });
});
