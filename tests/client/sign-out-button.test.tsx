/**
 * Signing out on a shared phone: with changes still waiting, the dialog offers to send them first
 * and signs out only once none are left; when sending leaves some behind it says why and keeps the
 * person signed in until they choose. Signing out never waits for the server's answer.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, render, waitFor } from '@testing-library/react-native';

import { SignOutButton } from '../../components/auth/sign-out-button';
import { pendingSignOut } from '../../store/pending-sign-out';
import { resetSessionForTests, useSession } from '../../store/session';
import { useSyncStatus } from '../../store/sync-status';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0192f1a8-7c3e-7a10-8000-0000000000aa';
const mockUnsent = jest.fn<Promise<number>, []>();
const mockRunSync = jest.fn();
const mockRelease = jest.fn(() => Promise.resolve());

// react-native-web's Modal renders through a DOM portal, which the test renderer cannot hold.
jest.mock('react-native-web/dist/exports/Modal', () => ({
  __esModule: true,
  default: ({ visible, children }: { visible: boolean; children: unknown }) => (visible ? children : null),
}));
jest.mock('../../store/device-owner', () => ({
  unsentOnDevice: () => mockUnsent(),
  releaseDevice: () => mockRelease(),
}));
jest.mock('../../store/sync-status', () => {
  const { create } = jest.requireActual('zustand');
  return { runSync: (teamId: string) => mockRunSync(teamId), useSyncStatus: create(() => ({ error: null })) };
});

function signIn() {
  useSession.getState().setSession({
    accessToken: 'coach-token',
    expiresIn: 900,
    user: { id: '0192f1a8-7c3e-7a10-8000-000000000001', email: 'anouk@example.org', displayName: 'Anouk' },
    memberships: [{ teamId: TEAM, teamName: 'Kettlemere', role: 'head_coach', skaterId: null }],
  } as never);
}

function renderButton() {
  render(
    <QueryClientProvider client={new QueryClient()}>
      <SignOutButton />
    </QueryClientProvider>,
  );
}

describe('the sign-out button', () => {
  const fetchMock = jest.fn();
  beforeEach(() => {
    localStorage.clear();
    resetSessionForTests();
    mockUnsent.mockReset();
    mockRunSync.mockReset();
    mockRelease.mockClear();
    fetchMock.mockReset();
    // The server never answers: sign-out must not wait for it.
    fetchMock.mockImplementation(() => new Promise(() => undefined));
    global.fetch = fetchMock as unknown as typeof fetch;
    useSyncStatus.setState({ error: null });
    signIn();
  });

  it('signs out on the device at once, with nothing waiting, while the server has not answered', async () => {
    mockUnsent.mockResolvedValue(0);
    renderButton();
    await fireWeb(getByTestIdWeb('sign-out'), 'onPress');
    await waitFor(() => expect(useSession.getState().user).toBeNull());
    expect(mockRelease).toHaveBeenCalledTimes(1);
    // Written down before it left, so it is sent again until the server has it.
    expect(pendingSignOut()).not.toBeNull();
    expect(fetchMock.mock.calls.map(([url]) => String(url))).toEqual([expect.stringContaining('/api/auth/sign-out')]);
  });

  it('sends waiting changes first, then signs out', async () => {
    mockUnsent.mockResolvedValueOnce(3).mockResolvedValueOnce(0);
    let finish: (value: unknown) => void = () => undefined;
    mockRunSync.mockImplementation(() => new Promise((resolve) => (finish = resolve)));
    renderButton();
    await fireWeb(getByTestIdWeb('sign-out'), 'onPress');
    expect(textOf(getByTestIdWeb('sign-out-unsent'))).toContain('3 changes');
    const send = getByTestIdWeb('sign-out-send-first');
    // A gloved double tap, the second while the first is still sending: one run.
    await fireWeb(send, 'onPress');
    await fireWeb(send, 'onPress');
    expect(useSession.getState().user).not.toBeNull();
    await act(async () => finish({}));
    await waitFor(() => expect(useSession.getState().user).toBeNull());
    expect(mockRunSync).toHaveBeenCalledTimes(1);
    expect(mockRunSync).toHaveBeenCalledWith(TEAM);
  });

  it('says why when sending leaves changes behind, and stays signed in', async () => {
    mockUnsent.mockResolvedValueOnce(2).mockResolvedValueOnce(1);
    mockRunSync.mockImplementation(async () => {
      useSyncStatus.setState({ error: 'Push failed: the server cannot be reached' });
      return null;
    });
    renderButton();
    await fireWeb(getByTestIdWeb('sign-out'), 'onPress');
    await fireWeb(getByTestIdWeb('sign-out-send-first'), 'onPress');
    await waitFor(() => expect(queryByTestIdWeb('sign-out-send-error')).not.toBeNull());
    expect(textOf(getByTestIdWeb('sign-out-send-error'))).toContain('cannot be reached');
    expect(textOf(getByTestIdWeb('sign-out-unsent'))).toContain('1 change ');
    expect(useSession.getState().user).not.toBeNull();
    await fireWeb(getByTestIdWeb('sign-out-confirm'), 'onPress');
    await waitFor(() => expect(useSession.getState().user).toBeNull());
  });

  it('"Stay signed in" keeps the person and sends nothing', async () => {
    mockUnsent.mockResolvedValue(4);
    renderButton();
    await fireWeb(getByTestIdWeb('sign-out'), 'onPress');
    await fireWeb(getByTestIdWeb('sign-out-cancel'), 'onPress');
    expect(useSession.getState().user).not.toBeNull();
    expect(mockRunSync).not.toHaveBeenCalled();
    expect(fetchMock).not.toHaveBeenCalled();
  });
});
