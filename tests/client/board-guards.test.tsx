/**
 * A gloved double tap on a button whose work is still on its way does it once: "Add cue" adds one
 * cue, "Add skater" one skater, "Send invitation" one invitation. Each save is held pending here
 * (a promise that has not settled), and the second tap comes before the screen has re-rendered.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, render } from '@testing-library/react-native';
import type { ReactElement } from 'react';

import { CueLibrary } from '../../components/board/cue-library';
import { AddSkaterForm } from '../../components/squad/add-skater-form';
import { InviteForm } from '../../components/squad/invite-form';
import { fireWeb, getByTestIdWeb } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';

let release: () => void = () => undefined;
const pending = () => new Promise<never>((_, reject) => (release = () => reject(new Error('stopped'))));
const mockEditCue = jest.fn(pending);
const mockAddSkater = jest.fn(pending);
const mockInvite = jest.fn(pending);
const hook = (fn: jest.Mock) => ({ mutate: jest.fn(), mutateAsync: fn, isPending: false, isError: false, error: null });

jest.mock('../../store/board', () => ({ useEditCue: () => hook(mockEditCue) }));
jest.mock('../../store/team', () => ({ useAddSkater: () => hook(mockAddSkater), useInvite: () => hook(mockInvite) }));

function renderWith(ui: ReactElement) {
  const client = new QueryClient();
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

/** Two taps in one go: the second before any re-render. */
async function doubleTap(id: string) {
  const button = getByTestIdWeb(id);
  await fireWeb(button, 'onPress');
  await fireWeb(button, 'onPress');
}

describe('double taps on buttons whose work is on its way', () => {
  afterEach(async () => {
    await act(async () => release());
    jest.clearAllMocks();
  });

  it('"Add cue" adds one cue', async () => {
    renderWith(<CueLibrary teamId={TEAM} cues={[]} onClose={() => undefined} />);
    await fireWeb(getByTestIdWeb('cue-add-input'), 'onChangeText', 'Quiet arms on the straight');
    await doubleTap('cue-add-save');
    expect(mockEditCue).toHaveBeenCalledTimes(1);
    expect(mockEditCue).toHaveBeenCalledWith({ kind: 'add', phase: 'straight', label: 'Quiet arms on the straight' });
  });

  it('"Add skater" adds one skater', async () => {
    renderWith(<AddSkaterForm teamId={TEAM} groups={[]} />);
    await fireWeb(getByTestIdWeb('squad-add-skater-name'), 'onChangeText', 'Wietske Oosterhof');
    await doubleTap('squad-add-skater-submit');
    expect(mockAddSkater).toHaveBeenCalledTimes(1);
  });

  it('"Send invitation" sends one invitation', async () => {
    renderWith(<InviteForm teamId={TEAM} skaters={[{ id: ANNA, displayName: 'Anna Reede', groupId: null, hasAccount: false } as never]} preset={null} />);
    await fireWeb(getByTestIdWeb('invite-email'), 'onChangeText', 'assistant@example.test');
    await fireWeb(getByTestIdWeb('invite-role-coach'), 'onPress');
    await doubleTap('invite-submit');
    expect(mockInvite).toHaveBeenCalledTimes(1);
  });
});
