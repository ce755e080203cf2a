/**
 * The review's Tidy-up section (components/review/tidy) over a faked device store: sessions by
 * day, newest first, with who made them and their note count; a session's notes with skater, cue,
 * mark, words and author; another coach's note read only with the reason; a fix (cue, skater,
 * words) handed to the store as one change and followed by a sync; a delete that asks first and
 * deletes one note however often the confirm is tapped; a merge offered only for another session
 * of the same day or the day beside it, saying which session is kept, and run once however often
 * its confirm is tapped; the store's refusal shown in words.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, render, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { TidySection } from '../../components/review/tidy/tidy-section';
import { useSession } from '../../store/session';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const HEAD = '0190a0b0-0000-7000-8000-0000000000c1';
const COACH = '0190a0b0-0000-7000-8000-0000000000c2';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const CURVE = '0190a0b0-0000-7000-8000-0000000000f1';
const START = '0190a0b0-0000-7000-8000-0000000000f2';
const S_NEAR = '0190a0b0-0000-7000-8000-0000000000d1';
const S_FAR = '0190a0b0-0000-7000-8000-0000000000d2';
const S_OLD = '0190a0b0-0000-7000-8000-0000000000d3';
const N_MINE = '0190a0b0-0000-7000-8000-0000000000e1';
const N_HEAD = '0190a0b0-0000-7000-8000-0000000000e2';
const N_FAR = '0190a0b0-0000-7000-8000-0000000000e3';

const note = (id: string, sessionId: string, createdBy: string, authorName: string, over: Record<string, unknown> = {}) => ({
  id, teamId: TEAM, sessionId, skaterId: ANNA, cueId: CURVE, mark: 'needs_work', note: '', noteShared: false,
  createdAt: '2026-12-02T09:00:00.000Z', createdBy, authorName, acknowledgedAt: null, ...over,
});
const session = (id: string, day: string, createdBy: string, title: string, notes: unknown[], boardSession = false) => ({
  id, teamId: TEAM, day, rink: 'Oval', title, focusCueIds: [], createdAt: `${day}T08:00:00.000Z`, createdBy, boardSession, notes,
});

const mockStore = {
  listTidySessions: jest.fn(),
  listCues: jest.fn(),
  fixNote: jest.fn(),
  removeObservations: jest.fn(),
  mergeSessions: jest.fn(),
};
jest.mock('../../sync', () => ({ deviceStore: async () => mockStore }));
const mockRunSync = jest.fn();
jest.mock('../../store/sync-status', () => ({ notifyLocalChange: () => undefined, runSync: (team: string) => mockRunSync(team) }));

const skaters = [
  { id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: true, retired: false },
  { id: BEREND, displayName: 'Berend Visser', groupId: null, hasAccount: true, retired: false },
];

function signIn(userId: string, role: 'coach' | 'head_coach') {
  useSession.setState({
    user: { id: userId, email: 'c@example.test', displayName: 'Coach' },
    memberships: [{ teamId: TEAM, teamName: 'Oval club', role, skaterId: null }],
    activeTeamId: TEAM,
  } as never);
}

beforeEach(() => {
  jest.clearAllMocks();
  mockStore.listTidySessions.mockResolvedValue([
    session(S_NEAR, '2026-12-02', HEAD, 'Near side', [note(N_MINE, S_NEAR, COACH, 'Jelle Vink', { note: 'قوس أعمق 🙂' }), note(N_HEAD, S_NEAR, HEAD, 'Marit Hoek')], true),
    session(S_FAR, '2026-12-02', COACH, 'Far side', [note(N_FAR, S_FAR, COACH, 'Jelle Vink', { cueId: START, mark: 'good' })]),
    session(S_OLD, '2026-11-30', HEAD, 'Monday', []),
  ]);
  mockStore.listCues.mockResolvedValue([
    { id: CURVE, phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false },
    { id: START, phase: 'start', label: 'Low first steps', sortOrder: 1, archived: false },
  ]);
  mockStore.fixNote.mockResolvedValue({});
  mockStore.removeObservations.mockResolvedValue(undefined);
  mockStore.mergeSessions.mockResolvedValue({ kept: S_NEAR, removed: S_FAR, moved: 1 });
  mockRunSync.mockResolvedValue(null);
  signIn(COACH, 'coach');
});

function renderSection(wide = true) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: wide ? 1440 : 390, height: 900 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <TidySection teamId={TEAM} skaters={skaters} groups={[]} skaterId={null} group="all" onPickSkater={() => undefined} timeZone="UTC" wide={wide} />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

const shown = (id: string) => waitFor(() => getByTestIdWeb(id), { timeout: 5000 });
const tap = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');
const text = (id: string) => textOf(getByTestIdWeb(id));

describe('tidy-up', () => {
  it('lists the sessions by day, newest first, with who made them and how many notes, and the first one\'s notes', async () => {
    renderSection();
    await shown('tidy-sessions');
    const order = getByTestIdWeb('tidy-sessions').findAll((n) => typeof n.type === 'string' && /^tidy-session-/.test(String(n.props['data-testid'])));
    expect(order.map((n) => n.props['data-testid'])).toEqual([`tidy-session-${S_NEAR}`, `tidy-session-${S_FAR}`, `tidy-session-${S_OLD}`]);
    expect(text(`tidy-session-${S_NEAR}`)).toContain('Made by Coach Marit · 2 notes');
    expect(text(`tidy-session-${S_FAR}`)).toContain('Made by you · 1 note');
    expect(text(`tidy-note-skater-${N_MINE}`)).toBe('Anna Reede');
    expect(text(`tidy-note-cue-${N_MINE}`)).toBe('Lean in from the ankle (Curve)');
    expect(text(`tidy-note-text-${N_MINE}`)).toBe('قوس أعمق 🙂');
    expect(text(`tidy-note-author-${N_MINE}`)).toContain('By Coach Jelle');
  });

  it('shows another coach\'s note read only, with the reason, to a plain coach; the head coach may fix it', async () => {
    const view = renderSection();
    await shown(`tidy-note-${N_HEAD}`);
    expect(text(`tidy-note-readonly-${N_HEAD}`)).toMatch(/Coach Marit wrote this note, so only they or the head coach can change it/);
    expect(queryByTestIdWeb(`tidy-note-fix-${N_HEAD}`)).toBeNull();
    expect(queryByTestIdWeb(`tidy-note-fix-${N_MINE}`)).not.toBeNull();
    view.unmount();
    signIn(HEAD, 'head_coach');
    renderSection();
    await shown(`tidy-note-fix-${N_HEAD}`);
    expect(queryByTestIdWeb(`tidy-note-readonly-${N_HEAD}`)).toBeNull();
  });

  it('fixes a mis-tap\'s cue, moves the note to another skater and adds words in one change, then syncs', async () => {
    renderSection();
    await shown(`tidy-note-fix-${N_MINE}`);
    await tap(`tidy-note-fix-${N_MINE}`);
    await tap(`tidy-fix-phase-start-${N_MINE}`);
    await tap(`tidy-fix-cue-${START}-${N_MINE}`);
    await tap(`tidy-fix-skater-${BEREND}-${N_MINE}`);
    expect(text(`tidy-fix-move-hint-${N_MINE}`)).toMatch(/leaves the other skater/);
    await fireWeb(getByTestIdWeb(`tidy-fix-text-${N_MINE}`), 'onChangeText', 'Longer words for the evening');
    await tap(`tidy-fix-save-${N_MINE}`);
    await waitFor(() => expect(mockStore.fixNote).toHaveBeenCalledTimes(1));
    expect(mockStore.fixNote).toHaveBeenCalledWith(
      N_MINE,
      COACH,
      { mark: 'needs_work', cueId: START, skaterId: BEREND, note: 'Longer words for the evening', noteShared: false },
      'coach',
    );
    await shown('tidy-message-success');
    expect(mockRunSync).toHaveBeenCalledWith(TEAM);
    await waitFor(() => expect(mockStore.listTidySessions.mock.calls.length).toBeGreaterThan(1));
  });

  it('asks before deleting, and a double tap on the confirm deletes one note', async () => {
    renderSection();
    await shown(`tidy-note-delete-${N_MINE}`);
    await tap(`tidy-note-delete-${N_MINE}`);
    expect(mockStore.removeObservations).not.toHaveBeenCalled();
    const yes = getByTestIdWeb(`tidy-note-delete-yes-${N_MINE}`);
    await fireWeb(yes, 'onPress');
    await fireWeb(yes, 'onPress');
    await shown('tidy-message-success');
    expect(text('tidy-message-success')).toMatch(/Note deleted/);
    expect(mockStore.removeObservations).toHaveBeenCalledTimes(1);
    expect(mockStore.removeObservations).toHaveBeenCalledWith([N_MINE], COACH, 'coach');
    // The second tap lands on what is there now: at most the question again, never a second delete.
    if (queryByTestIdWeb(`tidy-note-delete-no-${N_MINE}`)) await tap(`tidy-note-delete-no-${N_MINE}`);
    // "Keep it" backs out without deleting.
    await tap(`tidy-note-delete-${N_MINE}`);
    await tap(`tidy-note-delete-no-${N_MINE}`);
    await shown(`tidy-note-fix-${N_MINE}`);
    expect(mockStore.removeObservations).toHaveBeenCalledTimes(1);
  });

  it('offers a merge only with another session of the same day, asks first saying which is kept, then merges', async () => {
    signIn(HEAD, 'head_coach');
    renderSection(false);
    await shown('tidy-merge');
    expect(queryByTestIdWeb(`tidy-merge-${S_NEAR}`)).toBeNull();
    expect(queryByTestIdWeb(`tidy-merge-${S_OLD}`)).toBeNull();
    await tap(`tidy-merge-${S_FAR}`);
    await shown(`tidy-merge-confirm-${S_FAR}`);
    // The board's session (Near side) is kept, whichever side the merge is started from.
    expect(text(`tidy-merge-question-${S_FAR}`)).toBe(
      'Merge these two sessions? The notes of “Far side · Oval” move into “Near side · Oval”; “Far side · Oval” is left empty.',
    );
    await tap(`tidy-merge-yes-${S_FAR}`);
    await waitFor(() => expect(mockStore.mergeSessions).toHaveBeenCalledWith(TEAM, HEAD, S_NEAR, S_FAR, 'head_coach'));
    // The Monday session has no partner: no merge offered there.
    await tap(`tidy-session-${S_OLD}`);
    await waitFor(() => expect(queryByTestIdWeb('tidy-merge')).toBeNull());
  });

  it('says why the device refused a change', async () => {
    mockStore.mergeSessions.mockRejectedValue(new Error('Only the head coach may merge these sessions: 1 of the notes were written by another coach'));
    renderSection();
    await shown(`tidy-merge-${S_FAR}`);
    await tap(`tidy-merge-${S_FAR}`);
    await tap(`tidy-merge-yes-${S_FAR}`);
    await shown('tidy-message-error');
    expect(text('tidy-message-error')).toMatch(/Only the head coach may merge these sessions/);
    expect(mockRunSync).not.toHaveBeenCalled();
  });

  it('a double tap on Merge merges once', async () => {
    signIn(HEAD, 'head_coach');
    let finish!: (v: unknown) => void;
    mockStore.mergeSessions.mockImplementation(() => new Promise((resolve) => (finish = resolve)));
    renderSection();
    await shown(`tidy-merge-${S_FAR}`);
    await tap(`tidy-merge-${S_FAR}`);
    // Both taps reach the button before it re-renders (a gloved double tap).
    let node: ReturnType<typeof getByTestIdWeb> | null = getByTestIdWeb(`tidy-merge-yes-${S_FAR}`);
    while (node && (typeof node.type === 'string' || typeof node.props.onPress !== 'function')) node = node.parent;
    const press = node!.props.onPress as () => void;
    await act(async () => {
      press();
      press();
    });
    await waitFor(() => expect(mockStore.mergeSessions).toHaveBeenCalled());
    finish({ kept: S_NEAR, removed: S_FAR, moved: 1 });
    await shown('tidy-message-success');
    expect(mockStore.mergeSessions).toHaveBeenCalledTimes(1);
  });

  it('offers a merge with a session of the day beside it (past midnight), naming the days, and keeps the earlier day\'s board session', async () => {
    signIn(HEAD, 'head_coach');
    const S_NEXT = '0190a0b0-0000-7000-8000-0000000000d4';
    mockStore.listTidySessions.mockResolvedValue([
      session(S_NEXT, '2026-12-03', COACH, 'Late block', [note(N_FAR, S_NEXT, COACH, 'Jelle Vink')], true),
      session(S_NEAR, '2026-12-02', HEAD, 'Near side', [note(N_HEAD, S_NEAR, HEAD, 'Marit Hoek')], true),
      session(S_OLD, '2026-11-30', HEAD, 'Monday', [note(N_MINE, S_OLD, HEAD, 'Marit Hoek')], true),
    ]);
    mockStore.mergeSessions.mockResolvedValue({ kept: S_NEAR, removed: S_NEXT, moved: 1 });
    renderSection();
    await shown(`tidy-merge-${S_NEAR}`);
    expect(queryByTestIdWeb(`tidy-merge-${S_OLD}`)).toBeNull();
    await tap(`tidy-merge-${S_NEAR}`);
    const question = text(`tidy-merge-question-${S_NEAR}`);
    expect(question).toMatch(/^Merge these two sessions\? The notes of “Late block · Oval” \(.+\) move into “Near side · Oval” \(.+\); “Late block · Oval” \(.+\) is left empty\.$/);
    await tap(`tidy-merge-yes-${S_NEAR}`);
    await waitFor(() => expect(mockStore.mergeSessions).toHaveBeenCalledWith(TEAM, HEAD, S_NEXT, S_NEAR, 'head_coach'));
    await shown('tidy-message-success');
  });
});
