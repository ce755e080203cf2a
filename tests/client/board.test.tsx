/**
 * The board's tiles and chips, with the device store's hooks replaced by fixed data: a tile counts
 * today's notes for its skater, each chip has a "needs work" and a "good" zone that record with
 * the right mark for the picked skaters, and a tap with nobody picked records nothing and says so.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { BoardScreen } from '../../components/board/board-screen';
import { useBoardUi } from '../../store/board-ui';
import { useSession } from '../../store/session';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const SESSION = '0190a0b0-0000-7000-8000-000000000002';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BRAM = '0190a0b0-0000-7000-8000-0000000000b2';
const GROUP = '0190a0b0-0000-7000-8000-0000000000c3';
const KNEE = '0190a0b0-0000-7000-8000-0000000000d4';
const CORA = '0190a0b0-0000-7000-8000-0000000000f5';

const mockRecord = jest.fn();
const obs = (id: string, skaterId: string) => ({
  id,
  teamId: TEAM,
  sessionId: SESSION,
  skaterId,
  cueId: KNEE,
  mark: 'needs_work',
  note: '',
  noteShared: false,
  createdAt: '2026-03-14T10:15:00.000Z',
  createdBy: TEAM,
});

jest.mock('expo-router', () => {
  const { Text } = jest.requireActual('react-native-web');
  return { Link: ({ children, testID }: { children: ReactNode; testID?: string }) => <Text testID={testID}>{children}</Text> };
});

jest.mock('../../store/board', () => {
  const idle = { mutate: jest.fn(), mutateAsync: jest.fn(), isPending: false, isError: false, error: null, variables: undefined };
  const fixed = (key: string, data: unknown) => ({ queryKey: ['test', key], queryFn: async () => data, staleTime: Infinity });
  return {
    squadOnDevice: () =>
      fixed('squad', {
        groups: [{ id: GROUP, name: 'Juniors', sortOrder: 1 }],
        skaters: [
          { id: ANNA, displayName: 'Anna Reede', groupId: GROUP, hasAccount: false, retired: false },
          { id: BRAM, displayName: 'Bram Tolsma', groupId: null, hasAccount: false, retired: false },
        ],
        // Cora retired after this morning's note: off the board, still named in the feed.
        everyone: [
          { id: ANNA, displayName: 'Anna Reede', groupId: GROUP, hasAccount: false, retired: false },
          { id: BRAM, displayName: 'Bram Tolsma', groupId: null, hasAccount: false, retired: false },
          { id: CORA, displayName: 'Cora Wiersma', groupId: GROUP, hasAccount: false, retired: true },
        ],
      }),
    cuesOnDevice: () => fixed('cues', [{ id: KNEE, phase: 'straight', label: 'Deeper knee bend', sortOrder: 1, archived: false }]),
    observationsOnDevice: () =>
      fixed('obs', [
        obs('0190a0b0-0000-7000-8000-0000000000e1', ANNA),
        obs('0190a0b0-0000-7000-8000-0000000000e2', ANNA),
        obs('0190a0b0-0000-7000-8000-0000000000e3', CORA),
      ]),
    useTodaySession: () => ({
      data: { id: SESSION, teamId: TEAM, day: '2026-03-14', rink: '', title: '', focusCueIds: [], createdAt: '', createdBy: TEAM },
      isPending: false,
      error: null,
    }),
    useLoadTeamFromServer: () => ({ isFetching: false }),
    usePendingSummary: () => ({ total: 3, text: '2 notes and 1 session waiting to be sent' }),
    useRecordObservations: () => ({ ...idle, mutate: mockRecord }),
    useRemoveObservations: () => idle,
    useUpdateObservation: () => idle,
    useUpdateSession: () => idle,
    useEditCue: () => idle,
    newObservationIds: (n: number) => Array.from({ length: n }, (_, i) => `new-${i}`),
  };
});

function renderBoard() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <BoardScreen />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

describe('BoardScreen', () => {
  beforeEach(() => {
    mockRecord.mockReset();
    useBoardUi.setState({ selected: [], group: 'all' });
    useSession.setState({
      status: 'signedIn',
      offline: false,
      user: { id: TEAM, email: 'c@example.test', displayName: 'Coach Test' } as never,
      memberships: [{ teamId: TEAM, teamName: 'Test Club', role: 'coach' } as never],
      activeTeamId: TEAM,
    });
  });

  it('counts today’s notes on each tile and shows what waits to be sent', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb(`skater-tile-${ANNA}`));
    await waitFor(() => expect(textOf(getByTestIdWeb(`tile-count-${ANNA}`))).toContain('2 notes'));
    expect(textOf(getByTestIdWeb(`tile-count-${BRAM}`))).toContain('0 notes');
    // The tile is named by all it shows (name, group, today's count), not by the name alone.
    expect(getByTestIdWeb(`skater-tile-${ANNA}`).props['aria-label']).toBeUndefined();
    expect(textOf(getByTestIdWeb(`skater-tile-${ANNA}`))).toMatch(/Anna Reede.*2 notes/);
    // The phone says it short; the full wording is the line's label.
    expect(textOf(getByTestIdWeb('status-pending'))).toBe('3 waiting to be sent');
    expect(getByTestIdWeb('status-pending').props['aria-label']).toContain('2 notes and 1 session waiting');
  });

  it('a retired skater has no tile, and their note in the feed still names them', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb('feed-item-0190a0b0-0000-7000-8000-0000000000e3'));
    expect(queryByTestIdWeb(`skater-tile-${CORA}`)).toBeNull();
    expect(textOf(getByTestIdWeb('feed-item-0190a0b0-0000-7000-8000-0000000000e3'))).toContain('Cora Wiersma');
  });

  it('on a phone, one button steps the tiles through the groups', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb('group-switch'));
    expect(textOf(getByTestIdWeb('group-switch'))).toContain('Everyone');
    await fireWeb(getByTestIdWeb('group-switch'), 'onPress');
    expect(textOf(getByTestIdWeb('group-switch'))).toContain('Juniors');
    expect(queryByTestIdWeb(`skater-tile-${ANNA}`)).not.toBeNull();
    expect(queryByTestIdWeb(`skater-tile-${BRAM}`)).toBeNull();
    await fireWeb(getByTestIdWeb('group-switch'), 'onPress');
    expect(textOf(getByTestIdWeb('group-switch'))).toContain('No group');
    expect(queryByTestIdWeb(`skater-tile-${ANNA}`)).toBeNull();
    await fireWeb(getByTestIdWeb('group-switch'), 'onPress');
    expect(textOf(getByTestIdWeb('group-switch'))).toContain('Everyone');
  });

  it('records "needs work" from the main zone and "good" from the end zone, for the picked skaters', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb(`cue-chip-${KNEE}`));
    expect(getByTestIdWeb(`cue-chip-${KNEE}`).props['aria-label']).toBe('Deeper knee bend: needs work');
    expect(getByTestIdWeb(`cue-good-${KNEE}`).props['aria-label']).toBe('Deeper knee bend: good');

    // Nobody picked: a prompt, and nothing recorded.
    await fireWeb(getByTestIdWeb(`cue-chip-${KNEE}`), 'onPress');
    expect(mockRecord).not.toHaveBeenCalled();
    expect(textOf(getByTestIdWeb('board-notice-prompt'))).toContain('Pick a skater first');

    await fireWeb(getByTestIdWeb(`skater-tile-${ANNA}`), 'onPress');
    await fireWeb(getByTestIdWeb(`skater-tile-${BRAM}`), 'onPress');
    await fireWeb(getByTestIdWeb(`cue-good-${KNEE}`), 'onPress');
    expect(mockRecord).toHaveBeenCalledWith(
      expect.objectContaining({ teamId: TEAM, sessionId: SESSION, cueId: KNEE, mark: 'good', skaterIds: [ANNA, BRAM], ids: ['new-0', 'new-1'] }),
    );
    expect(textOf(getByTestIdWeb('undo-bar'))).toContain('Anna Reede and Bram Tolsma');

    // The same tap again a moment later is a second note, and the bar says so (a bounce within
    // 400 ms would be the same note: tests/client/board-taps.test.tsx).
    const later = Date.now() + 1000;
    jest.spyOn(Date, 'now').mockReturnValue(later);
    await fireWeb(getByTestIdWeb(`cue-good-${KNEE}`), 'onPress');
    jest.restoreAllMocks();
    expect(mockRecord).toHaveBeenCalledTimes(2);
    expect(textOf(getByTestIdWeb('undo-bar-title'))).toContain('Noted again');
    expect(queryByTestIdWeb('undo-button')).not.toBeNull();
  });
});
