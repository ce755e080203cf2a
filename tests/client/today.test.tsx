/**
 * The skater's "today" page with the device hooks replaced by fixed notes: cues grouped by phase
 * in the library's phase order, "Got it" calls the acknowledge mutation and an acknowledged note
 * says so, "Read aloud" speaks the cues in the page's order (and stops), the days row switches
 * day, the empty day points to the last day with cues, "Refresh" runs a sync, and a guardian
 * reads "Fenna’s cues".
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { TodayScreen } from '../../components/today/today-screen';
import { useConnectivity } from '../../store/connectivity';
import { useSession } from '../../store/session';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const FENNA = '0190a0b0-0000-7000-8000-0000000000f1';
const USER = '0190a0b0-0000-7000-8000-0000000000aa';
const TODAY = '2026-12-02';
const EARLIER = '2026-11-28';

const note = (id: string, phase: string | null, cueLabel: string | null, over: Record<string, unknown> = {}) => ({
  id,
  sessionId: TEAM,
  cueId: `${id}-cue`,
  cueLabel,
  phase,
  cueOrder: 1,
  mark: 'needs_work',
  note: '',
  noteShared: false,
  createdAt: '2026-12-02T09:00:00.000Z',
  createdBy: USER,
  acknowledgedAt: null,
  ...over,
});

const notesByDay: Record<string, ReturnType<typeof note>[]> = {
  [TODAY]: [
    // Given in time order; the page shows them phase by phase (start, ..., curve, ..., pacing).
    note('n-curve', 'curve', 'Lean in from the ankle', { note: 'Lower hips in lap 3', noteShared: true, authorName: 'Anouk Brink' }),
    note('n-pacing', 'pacing', 'Even laps', { mark: 'good' }),
    note('n-start', 'start', 'Sit lower in the set', { note: 'private words', noteShared: false }),
    note('n-curve2', 'curve', 'Hug the blocks', { acknowledgedAt: '2026-12-02T10:30:00.000Z' }),
  ],
  [EARLIER]: [note('n-old', 'straight', 'Longer glide', { createdAt: '2026-11-28T09:00:00.000Z' })],
};
let mockNotes: typeof notesByDay = notesByDay;

const mockAcknowledge = jest.fn();
const mockRunSync = jest.fn(async () => null);
const mockSpeak = jest.fn();
const mockStop = jest.fn();

jest.mock('../../store/speech', () => ({
  speak: (...args: unknown[]) => mockSpeak(...args),
  stop: () => mockStop(),
}));

jest.mock('../../store/sync-status', () => ({
  runSync: (...args: unknown[]) => mockRunSync(...(args as [])),
  useSyncStatus: () => ({ lastSyncAt: null, running: false, pending: 0, error: null }),
}));

jest.mock('../../store/today', () => ({
  todayOnDevice: () => '2026-12-02',
  refreshToday: jest.fn(),
  useSkaterName: () => 'Fenna Dykstra',
  useSkaterDays: () => ({
    data: Object.entries(mockNotes)
      .filter(([, list]) => list.length > 0)
      .map(([day, list]) => ({ day, count: list.length, unacknowledged: list.filter((n) => !n.acknowledgedAt).length }))
      .sort((a, b) => (a.day < b.day ? 1 : -1)),
    isPending: false,
    error: null,
  }),
  useSkaterNotes: (_team: string, _skater: string, day: string) => ({ data: mockNotes[day] ?? [], isPending: false, error: null }),
  useAcknowledge: () => ({ mutate: mockAcknowledge, isPending: false, error: null }),
}));

function renderToday() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <TodayScreen />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

function signIn(role: 'skater' | 'guardian', displayName: string) {
  useSession.setState({
    status: 'signedIn',
    offline: false,
    user: { id: USER, email: 'x@example.test', displayName } as never,
    memberships: [{ teamId: TEAM, teamName: 'Test Club', role, skaterId: FENNA } as never],
    activeTeamId: TEAM,
  });
}

/** The order in which the testIDs starting with `prefix` appear in the rendered tree. */
function idsInOrder(prefix: string): string[] {
  return screenIds().filter((id) => id.startsWith(prefix));
}
function screenIds(): string[] {
  const root = getByTestIdWeb('skater-home');
  return root
    .findAll((n) => typeof n.type === 'string' && typeof n.props['data-testid'] === 'string')
    .map((n) => n.props['data-testid'] as string);
}

describe('TodayScreen', () => {
  beforeEach(() => {
    mockNotes = notesByDay;
    mockAcknowledge.mockReset();
    mockRunSync.mockClear();
    mockSpeak.mockReset();
    mockStop.mockReset();
    useConnectivity.setState({ online: true });
    signIn('skater', 'Fenna Dykstra');
  });

  it('greets the skater and groups the day’s cues by phase, in the library’s phase order', async () => {
    renderToday();
    await waitFor(() => getByTestIdWeb('phase-start'));
    expect(textOf(getByTestIdWeb('today-heading'))).toBe('Hi Fenna');
    expect(textOf(getByTestIdWeb('today-day'))).toContain('Today');
    expect(idsInOrder('phase-title-').map((id) => textOf(getByTestIdWeb(id)))).toEqual(['Start (1)', 'Curve (2)', 'Pacing (1)']);
    expect(idsInOrder('note-cue-')).toEqual(['note-cue-n-start', 'note-cue-n-curve', 'note-cue-n-curve2', 'note-cue-n-pacing']);
    // The mark is a badge with the word; a shared note shows, a private one never does.
    expect(getByTestIdWeb('note-mark-n-pacing').props['aria-label']).toBe('Good');
    expect(textOf(getByTestIdWeb('note-mark-n-start'))).toContain('Needs work');
    expect(textOf(getByTestIdWeb('note-text-n-curve'))).toContain('Lower hips in lap 3');
    expect(queryByTestIdWeb('note-text-n-start')).toBeNull();
    expect(textOf(getByTestIdWeb('today-summary'))).toBe('4 cues, 3 to acknowledge');
    // The count is said once: the day shown does not repeat it in its button.
    expect(textOf(getByTestIdWeb(`day-${TODAY}`))).not.toMatch(/\d+ cues?/);
    expect(getByTestIdWeb('safety-note')).toBeTruthy();
  });

  it('"Got it" calls the acknowledge mutation; an acknowledged note shows "Acknowledged" instead', async () => {
    renderToday();
    await waitFor(() => getByTestIdWeb('ack-n-curve'));
    await fireWeb(getByTestIdWeb('ack-n-curve'), 'onPress');
    expect(mockAcknowledge).toHaveBeenCalledWith({ teamId: TEAM, skaterId: FENNA, day: TODAY, id: 'n-curve' });
    expect(queryByTestIdWeb('ack-n-curve2')).toBeNull();
    expect(textOf(getByTestIdWeb('acked-n-curve2'))).toContain('Acknowledged');
  });

  it('"Read aloud" speaks the cues in the page’s order, and "Stop reading" stops', async () => {
    renderToday();
    await waitFor(() => getByTestIdWeb('read-aloud'));
    await fireWeb(getByTestIdWeb('read-aloud'), 'onPress');
    const spoken = mockSpeak.mock.calls.map((call) => call[0] as string);
    expect(spoken).toHaveLength(5);
    expect(spoken[0]).toContain('4 cues');
    expect(spoken[1]).toContain('Start. Sit lower in the set. Needs work.');
    expect(spoken[1]).not.toContain('private words');
    expect(spoken[2]).toContain('Curve. Lean in from the ankle. Needs work.');
    expect(spoken[2]).toContain('Lower hips in lap 3');
    expect(spoken[3]).toContain('Hug the blocks');
    expect(spoken[4]).toContain('Pacing. Even laps. Good.');

    await fireWeb(getByTestIdWeb('read-stop'), 'onPress');
    expect(mockStop).toHaveBeenCalled();
    expect(getByTestIdWeb('read-aloud')).toBeTruthy();
  });

  it('says so when the device cannot read aloud, and is ready again after the last cue', async () => {
    mockSpeak.mockImplementation((_text: string, options?: { onEnd?: (outcome: string) => void }) => options?.onEnd?.('failed'));
    renderToday();
    await waitFor(() => getByTestIdWeb('read-aloud'));
    await fireWeb(getByTestIdWeb('read-aloud'), 'onPress');
    await waitFor(() => getByTestIdWeb('read-aloud-failed'));
    expect(getByTestIdWeb('read-aloud')).toBeTruthy();

    mockSpeak.mockImplementation((_text: string, options?: { onEnd?: (outcome: string) => void }) => options?.onEnd?.('done'));
    await fireWeb(getByTestIdWeb('read-aloud'), 'onPress');
    expect(queryByTestIdWeb('read-aloud-failed')).toBeNull();
    expect(queryByTestIdWeb('read-stop')).toBeNull();
  });

  it('switches to an earlier day from the days row and from "Earlier"', async () => {
    renderToday();
    await waitFor(() => getByTestIdWeb(`day-${EARLIER}`));
    expect(getByTestIdWeb(`day-${TODAY}`)).toBeTruthy();
    await fireWeb(getByTestIdWeb(`day-${EARLIER}`), 'onPress');
    await waitFor(() => getByTestIdWeb('note-cue-n-old'));
    expect(queryByTestIdWeb('note-cue-n-start')).toBeNull();
    expect(textOf(getByTestIdWeb('today-day'))).toContain('Saturday 28 November');

    await fireWeb(getByTestIdWeb('day-next'), 'onPress');
    await waitFor(() => getByTestIdWeb('note-cue-n-start'));
    await fireWeb(getByTestIdWeb('day-prev'), 'onPress');
    await waitFor(() => getByTestIdWeb('note-cue-n-old'));
  });

  it('an empty day says so and offers the last day with cues', async () => {
    mockNotes = { [TODAY]: [], [EARLIER]: notesByDay[EARLIER] };
    renderToday();
    await waitFor(() => getByTestIdWeb('today-empty'));
    expect(textOf(getByTestIdWeb('today-empty'))).toContain('No cues from your coaches today');
    expect(textOf(getByTestIdWeb('today-last-day'))).toContain('Saturday 28 November');
    expect(queryByTestIdWeb('read-aloud')).toBeNull();
    await fireWeb(getByTestIdWeb('today-show-last'), 'onPress');
    await waitFor(() => getByTestIdWeb('note-cue-n-old'));
  });

  it('shows "Offline" and runs a sync on "Refresh"', async () => {
    useConnectivity.setState({ online: false });
    renderToday();
    await waitFor(() => getByTestIdWeb('today-offline'));
    expect(textOf(getByTestIdWeb('today-offline'))).toContain('Offline');
    expect(textOf(getByTestIdWeb('today-last-sync'))).toContain('Not synced');
    await fireWeb(getByTestIdWeb('today-refresh'), 'onPress');
    expect(mockRunSync).toHaveBeenCalledWith(TEAM, expect.any(Function));
  });

  it('tells a guardian whose cues these are', async () => {
    signIn('guardian', 'Gerrit Dykstra');
    renderToday();
    await waitFor(() => getByTestIdWeb('guardian-note'));
    expect(textOf(getByTestIdWeb('today-heading'))).toBe('Fenna’s cues');
    expect(textOf(getByTestIdWeb('guardian-note'))).toContain('viewing as Fenna’s guardian');
  });

  it('shows a guardian a read-only line instead of "Got it", and whether the skater has read each cue', async () => {
    signIn('guardian', 'Gerrit Dykstra');
    renderToday();
    await waitFor(() => getByTestIdWeb('read-only-n-curve'));
    expect(queryByTestIdWeb('ack-n-curve')).toBeNull();
    expect(queryByTestIdWeb('ack-n-pacing')).toBeNull();
    expect(textOf(getByTestIdWeb('read-only-n-curve'))).toContain('Read only');
    // The skater's own acknowledgement still shows.
    getByTestIdWeb('acked-n-curve2');
    expect(textOf(getByTestIdWeb('today-summary'))).toContain('not yet read by the skater');
  });

  it('names the coach who wrote each note', async () => {
    signIn('skater', 'Fenna Dykstra');
    renderToday();
    await waitFor(() => getByTestIdWeb('note-author-n-curve'));
    expect(textOf(getByTestIdWeb('note-author-n-curve'))).toBe('from Coach Anouk');
    // A note from before names were kept says nothing rather than something wrong.
    expect(queryByTestIdWeb('note-author-n-pacing')).toBeNull();
  });
});
