/**
 * Taps that must neither lose nor invent notes, on the phone board (jest-expo/web, the device
 * store's hooks replaced by fixed data and spies):
 * - Undo removes only the tap the bar names, once: a second tap on Undo finds it "Undone".
 * - The bar stops offering a note as soon as the coach changes the pick.
 * - A bounce on the same chip zone for the same skaters within 400 ms is one note; a tap later,
 *   or on the other zone, is another.
 * - The phone shows one set of chips at a time, the session's focus cues first.
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
const KNEE = '0190a0b0-0000-7000-8000-0000000000d4';
const LEAN = '0190a0b0-0000-7000-8000-0000000000d5';
const GUN = '0190a0b0-0000-7000-8000-0000000000d6';

const mockRecord = jest.fn();
const mockRemove = jest.fn();
let mockIds = 0;

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
        groups: [],
        skaters: [
          { id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: false },
          { id: BRAM, displayName: 'Bram Tolsma', groupId: null, hasAccount: false },
        ],
      }),
    cuesOnDevice: () =>
      fixed('cues', [
        { id: GUN, phase: 'start', label: 'Explode on the gun', sortOrder: 1, archived: false },
        { id: KNEE, phase: 'straight', label: 'Deeper knee bend', sortOrder: 1, archived: false },
        { id: LEAN, phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false },
      ]),
    observationsOnDevice: () => fixed('obs', []),
    useTodaySession: () => ({
      data: { id: SESSION, teamId: TEAM, day: '2026-03-14', rink: '', title: '', focusCueIds: [LEAN], createdAt: '', createdBy: TEAM },
      isPending: false,
      error: null,
    }),
    usePendingSummary: () => ({ total: 0, text: 'Nothing waiting to be sent' }),
    useRecordObservations: () => ({ ...idle, mutate: mockRecord }),
    useRemoveObservations: () => ({ ...idle, mutate: mockRemove }),
    useUpdateObservation: () => idle,
    useUpdateSession: () => idle,
    useEditCue: () => idle,
    newObservationIds: (n: number) => Array.from({ length: n }, () => `new-${(mockIds += 1)}`),
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

const tap = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');

describe('the phone board under gloved taps', () => {
  let now = 1_000_000;
  beforeEach(() => {
    mockRecord.mockReset();
    mockRemove.mockReset();
    now = 1_000_000;
    jest.spyOn(Date, 'now').mockImplementation(() => now);
    useBoardUi.setState({ selected: [], group: 'all', chipSet: null });
    useSession.setState({
      status: 'signedIn',
      offline: false,
      user: { id: TEAM, email: 'c@example.test', displayName: 'Coach Test' } as never,
      memberships: [{ teamId: TEAM, teamName: 'Test Club', role: 'coach' } as never],
      activeTeamId: TEAM,
    });
  });
  afterEach(() => jest.restoreAllMocks());

  it('opens on the session’s focus cues, one set of chips at a time', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb('phase-pad'));
    expect(getByTestIdWeb('phase-tab-focus').props['aria-selected']).toBe(true);
    expect(queryByTestIdWeb(`cue-chip-${LEAN}`)).not.toBeNull();
    expect(queryByTestIdWeb(`cue-chip-${KNEE}`)).toBeNull();
    await tap('phase-tab-straight');
    expect(queryByTestIdWeb(`cue-chip-${KNEE}`)).not.toBeNull();
    expect(queryByTestIdWeb(`cue-chip-${LEAN}`)).toBeNull();
    expect(textOf(getByTestIdWeb('cue-section-straight'))).toContain('Deeper knee bend');
  });

  it('a double tap on a chip within 400 ms is one note; a tap later, or on the good zone, is another', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb(`skater-tile-${ANNA}`));
    await tap(`skater-tile-${ANNA}`);
    await tap(`cue-chip-${LEAN}`);
    now += 60;
    await tap(`cue-chip-${LEAN}`);
    expect(mockRecord).toHaveBeenCalledTimes(1);
    expect(textOf(getByTestIdWeb('undo-bar-title'))).toContain('Noted · Needs work');

    now += 60; // the other zone is another decision
    await tap(`cue-good-${LEAN}`);
    expect(mockRecord).toHaveBeenCalledTimes(2);
    expect(mockRecord).toHaveBeenLastCalledWith(expect.objectContaining({ mark: 'good', skaterIds: [ANNA] }));

    now += 1000; // a deliberate second tap
    await tap(`cue-good-${LEAN}`);
    expect(mockRecord).toHaveBeenCalledTimes(3);
    expect(textOf(getByTestIdWeb('undo-bar-title'))).toContain('Noted again ×2');
  });

  it('a double tap on Undo removes only the note the bar names, once, and says it is undone', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb(`skater-tile-${ANNA}`));
    await tap(`skater-tile-${ANNA}`);
    await tap(`cue-chip-${LEAN}`);
    now += 1000;
    await tap(`cue-good-${LEAN}`);
    const named = mockRecord.mock.calls[1][0].ids;
    expect(textOf(getByTestIdWeb('undo-bar'))).toContain('Lean in from the ankle');

    await tap('undo-button');
    now += 50;
    // The second tap lands on the same place: the button is now "Undone" and does nothing.
    const second = getByTestIdWeb('undo-button');
    expect(second.props['aria-disabled']).toBe(true);
    expect(textOf(second)).toContain('Undone');
    await fireWeb(second, 'onPress').catch(() => undefined);

    expect(mockRemove).toHaveBeenCalledTimes(1);
    expect(mockRemove).toHaveBeenCalledWith({ sessionId: SESSION, ids: named });
    expect(textOf(getByTestIdWeb('undo-bar-title'))).toContain('Undone');
  });

  it('picking the next skaters ends the offer to undo the previous note', async () => {
    renderBoard();
    await waitFor(() => getByTestIdWeb(`skater-tile-${ANNA}`));
    await tap(`skater-tile-${ANNA}`);
    await tap(`cue-chip-${LEAN}`);
    expect(queryByTestIdWeb('undo-button')).not.toBeNull();

    await tap(`skater-tile-${BRAM}`);
    expect(queryByTestIdWeb('undo-bar')).toBeNull();
    expect(queryByTestIdWeb('undo-button')).toBeNull();
    expect(textOf(getByTestIdWeb('selection-summary'))).toContain('For all 2: Anna Reede and Bram Tolsma');
    expect(mockRemove).not.toHaveBeenCalled();
  });
});
