/**
 * The head coach's squad controls against a faked API (fetch answers like the server would):
 * the skater detail (rename with the server's 409 on the field, a name the squad already has
 * refused before sending, move, retire after a confirm, a coach reads only), the retired section
 * with "Bring back", the staff list's confirm before removing someone, the invitation list's
 * statuses and actions, and the cue library refusing a label its phase already has. A gloved
 * double tap sends once everywhere. Every squad change is followed by a sync run, so the head
 * coach's own board has it at once (runSync is replaced by a mock here).
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, render, waitFor } from '@testing-library/react-native';
import type { ReactElement } from 'react';

import { CueLibrary } from '../../components/board/cue-library';
import { AddSkaterForm } from '../../components/squad/add-skater-form';
import { InvitationList } from '../../components/squad/invitation-list';
import { SkaterDetail } from '../../components/squad/skater-detail';
import { SquadList } from '../../components/squad/squad-list';
import { StaffList } from '../../components/squad/staff-list';
import type { Cue, Group, Invitation, Member, Skater } from '../../shared/schemas';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const CATO = '0190a0b0-0000-7000-8000-0000000000c3';
const JUNIORS = '0190a0b0-0000-7000-8000-0000000000d1';
const SPRINT = '0190a0b0-0000-7000-8000-0000000000d2';
const HEAD = '0190a0b0-0000-7000-8000-0000000000e1';
const ASSISTANT = '0190a0b0-0000-7000-8000-0000000000e2';
const PARENT = '0190a0b0-0000-7000-8000-0000000000e3';

const mockRunSync = jest.fn(async (..._args: unknown[]) => null);
jest.mock('../../store/sync-status', () => ({
  runSync: (...args: unknown[]) => mockRunSync(...args),
  useSyncStatus: Object.assign(() => ({}), { getState: () => ({ running: false }) }),
}));

const mockEditCue = jest.fn(async (..._args: unknown[]) => undefined);
jest.mock('../../store/board', () => ({
  boardKeys: { all: ['device'] },
  useEditCue: () => ({ mutateAsync: mockEditCue, isPending: false }),
}));

const skater = (id: string, displayName: string, over: Partial<Skater> = {}): Skater => ({
  id,
  displayName,
  groupId: null,
  hasAccount: false,
  retired: false,
  ...over,
});
const groups: Group[] = [
  { id: JUNIORS, name: 'Juniors', sortOrder: 1 },
  { id: SPRINT, name: 'Sprint', sortOrder: 2 },
];
const anna = skater(ANNA, 'Anna Reede', { groupId: JUNIORS });
const berend = skater(BEREND, 'Berend Visser', { hasAccount: true });
const cato = skater(CATO, 'Cato de Wit', { retired: true });
const squad = [anna, berend, cato];

type Call = { method: string; url: string; body: unknown };
const fetchMock = jest.fn();
const calls = (): Call[] =>
  fetchMock.mock.calls.map(([url, init]) => ({ method: init?.method ?? 'GET', url, body: init?.body ? JSON.parse(init.body) : undefined }));
/** Non-GET calls: what the screen asked the server to change. */
const changes = () => calls().filter((c) => c.method !== 'GET');

/**
 * fetch answers through `answer`; with `hold`, each change (not a read) is held back until
 * `release()`: a slow rink network, the screen still waiting when the second tap comes.
 */
let held: (() => void)[] = [];
function serve(answer: (call: Call) => { status: number; body?: unknown }, hold = false) {
  fetchMock.mockImplementation((url: string, init?: RequestInit) => {
    const call = { method: init?.method ?? 'GET', url, body: init?.body ? JSON.parse(String(init.body)) : undefined };
    const { status, body } = answer(call);
    const response = fakeResponse(status, body);
    if (!hold || call.method === 'GET') return Promise.resolve(response);
    return new Promise((resolve) => held.push(() => resolve(response)));
  });
}
const release = () => act(async () => held.splice(0).forEach((go) => go()));

function renderWith(ui: ReactElement) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

/** A banner's words, without the glyph that tells its kind. */
const bannerText = (id: string) => textOf(getByTestIdWeb(id)).replace(/^[!i\u2713]/, '');

async function doubleTap(id: string) {
  const button = getByTestIdWeb(id);
  await fireWeb(button, 'onPress');
  await fireWeb(button, 'onPress');
}

const detail = (who: Skater, canManage = true) => (
  <SkaterDetail
    teamId={TEAM}
    skater={who}
    skaters={squad}
    groups={groups}
    canManage={canManage}
    onInvite={() => undefined}
    onClose={() => undefined}
  />
);

beforeEach(() => {
  fetchMock.mockReset();
  mockRunSync.mockClear();
  mockEditCue.mockClear();
  held = [];
  global.fetch = fetchMock as unknown as typeof fetch;
});

describe('skater detail (head coach)', () => {
  it('renames: the server’s 409 for a name taken meanwhile is shown on the field', async () => {
    serve(() => ({
      status: 409,
      body: {
        error: {
          code: 'duplicate_name',
          message: 'There is already a skater called “Anna de Vries” on this squad.',
          fields: { displayName: 'There is already a skater called “Anna de Vries” on this squad.' },
        },
      },
    }));
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb('squad-detail-rename'), 'onPress');
    await fireWeb(getByTestIdWeb('squad-rename-input'), 'onChangeText', '  Anna de Vries ');
    await fireWeb(getByTestIdWeb('squad-rename-save'), 'onPress');

    await waitFor(() => expect(textOf(getByTestIdWeb('squad-rename-input-error'))).toContain('already a skater called “Anna de Vries”'));
    expect(changes()).toEqual([{ method: 'PATCH', url: `/api/teams/${TEAM}/skaters/${ANNA}`, body: { displayName: 'Anna de Vries' } }]);
    // Refused: nothing changed, so nothing to pull.
    expect(mockRunSync).not.toHaveBeenCalled();
  });

  it('refuses a name the squad already has (another letter case, a retired skater too) before sending', async () => {
    serve(() => ({ status: 500 }));
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb('squad-detail-rename'), 'onPress');
    await fireWeb(getByTestIdWeb('squad-rename-input'), 'onChangeText', 'berend VISSER');
    await fireWeb(getByTestIdWeb('squad-rename-save'), 'onPress');
    expect(textOf(getByTestIdWeb('squad-rename-input-error'))).toBe('“Berend Visser” is in the squad already: add an initial or a second name');

    await fireWeb(getByTestIdWeb('squad-rename-input'), 'onChangeText', 'Cato de wit');
    expect(textOf(getByTestIdWeb('squad-rename-input-error'))).toBe('A retired skater is called “Cato de Wit”: bring them back, or add an initial');
    await fireWeb(getByTestIdWeb('squad-rename-save'), 'onPress');
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('renames once per double tap and pulls the change onto the board', async () => {
    serve(({ body }) => ({ status: 200, body: { ...anna, ...(body as object) } }), true);
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb('squad-detail-rename'), 'onPress');
    await fireWeb(getByTestIdWeb('squad-rename-input'), 'onChangeText', 'Anna Reede-Bos');
    await doubleTap('squad-rename-save');
    expect(changes()).toHaveLength(1);
    await release();
    await waitFor(() => expect(bannerText('squad-detail-done')).toContain('Renamed to Anna Reede-Bos.'));
    expect(mockRunSync).toHaveBeenCalledWith(TEAM, expect.any(Function));
  });

  it('moves to another group with one tap (once per double tap) and says where', async () => {
    serve(({ body }) => ({ status: 200, body: { ...anna, ...(body as object) } }), true);
    renderWith(detail(anna));
    await doubleTap(`squad-detail-group-${SPRINT}`);
    expect(changes()).toEqual([{ method: 'PATCH', url: `/api/teams/${TEAM}/skaters/${ANNA}`, body: { groupId: SPRINT } }]);
    await release();
    await waitFor(() => expect(bannerText('squad-detail-done')).toBe('Anna Reede is now in Sprint.'));
    expect(mockRunSync).toHaveBeenCalledWith(TEAM, expect.any(Function));

    await fireWeb(getByTestIdWeb('squad-detail-group-none'), 'onPress');
    await release();
    expect(changes()[1].body).toEqual({ groupId: null });
  });

  it('retires only after the confirm, which says the history stays and the skater leaves the board', async () => {
    serve(() => ({ status: 200, body: { ...anna, retired: true } }), true);
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb('squad-detail-retire'), 'onPress');
    expect(fetchMock).not.toHaveBeenCalled();
    const confirm = textOf(getByTestIdWeb('squad-detail-retire-confirm'));
    expect(confirm).toContain('notes, times and reviews stay in the history');
    expect(confirm).toContain('leaves the board');

    await doubleTap('squad-detail-retire-yes');
    expect(changes()).toEqual([{ method: 'PATCH', url: `/api/teams/${TEAM}/skaters/${ANNA}`, body: { retired: true } }]);
    await release();
    await waitFor(() => expect(bannerText('squad-detail-done')).toContain('Anna Reede is retired'));
    expect(queryByTestIdWeb('squad-detail-retire-confirm')).toBeNull();
  });

  it('"Keep on the squad" closes the confirm without sending anything', async () => {
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb('squad-detail-retire'), 'onPress');
    await fireWeb(getByTestIdWeb('squad-detail-retire-no'), 'onPress');
    expect(queryByTestIdWeb('squad-detail-retire-confirm')).toBeNull();
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('a retired skater offers "Bring back", which sends retired: false', async () => {
    serve(() => ({ status: 200, body: { ...cato, retired: false } }));
    renderWith(detail(cato));
    expect(queryByTestIdWeb('squad-detail-retire')).toBeNull();
    expect(queryByTestIdWeb('squad-detail-group-choice')).toBeNull();
    await fireWeb(getByTestIdWeb('squad-detail-bring-back'), 'onPress');
    await waitFor(() => expect(bannerText('squad-detail-done')).toContain('Cato de Wit is back on the squad'));
    expect(changes()).toEqual([{ method: 'PATCH', url: `/api/teams/${TEAM}/skaters/${CATO}`, body: { retired: false } }]);
  });

  it('a refused move is said in words', async () => {
    serve(() => ({ status: 404, body: { error: { code: 'not_found', message: 'That group is not on this team.' } } }));
    renderWith(detail(anna));
    await fireWeb(getByTestIdWeb(`squad-detail-group-${SPRINT}`), 'onPress');
    await waitFor(() => expect(bannerText('squad-detail-error')).toBe('That group is not on this team.'));
    expect(mockRunSync).not.toHaveBeenCalled();
  });

  it('a new group: a name the team has is refused before sending; a new one is sent once', async () => {
    serve(({ body }) => ({ status: 201, body: { id: '0190a0b0-0000-7000-8000-0000000000d3', sortOrder: 3, ...(body as object) } }), true);
    renderWith(detail(anna));
    expect(queryByTestIdWeb('squad-new-group-name')).toBeNull();
    await fireWeb(getByTestIdWeb('squad-new-group-open'), 'onPress');
    await fireWeb(getByTestIdWeb('squad-new-group-name'), 'onChangeText', 'sprint ');
    await fireWeb(getByTestIdWeb('squad-new-group-submit'), 'onPress');
    expect(textOf(getByTestIdWeb('squad-new-group-name-error'))).toBe('“Sprint” exists already: pick another name');
    expect(fetchMock).not.toHaveBeenCalled();

    await fireWeb(getByTestIdWeb('squad-new-group-name'), 'onChangeText', 'Allround');
    await doubleTap('squad-new-group-submit');
    expect(changes()).toEqual([{ method: 'POST', url: `/api/teams/${TEAM}/groups`, body: { name: 'Allround' } }]);
    await release();
    await waitFor(() => expect(bannerText('squad-new-group-done')).toContain('Group “Allround” added'));
    // The form closes again once the group is made.
    expect(queryByTestIdWeb('squad-new-group-name')).toBeNull();
    expect(mockRunSync).toHaveBeenCalledWith(TEAM, expect.any(Function));
  });

  it('a coach reads the details without any control that changes them', async () => {
    renderWith(detail(anna, false));
    expect(textOf(getByTestIdWeb('squad-detail-group'))).toBe('Group: Juniors');
    for (const id of ['squad-detail-rename', 'squad-detail-retire', 'squad-detail-group-choice', 'squad-new-group-open', 'squad-detail-invite-guardian']) {
      expect(queryByTestIdWeb(id)).toBeNull();
    }
  });
});

describe('the squad list', () => {
  it('keeps retired skaters out of the groups, in a closed "Retired" section with "Bring back"', async () => {
    serve(() => ({ status: 200, body: { ...cato, retired: false } }), true);
    renderWith(<SquadList teamId={TEAM} squad={{ groups, skaters: squad }} selectedId={null} onSelect={() => undefined} canManage />);
    expect(queryByTestIdWeb(`squad-skater-${ANNA}`)).not.toBeNull();
    expect(queryByTestIdWeb(`squad-skater-${CATO}`)).toBeNull();
    expect(textOf(getByTestIdWeb('squad-retired-toggle'))).toContain('1 skater');

    await fireWeb(getByTestIdWeb('squad-retired-toggle'), 'onPress');
    expect(queryByTestIdWeb(`squad-skater-${CATO}`)).not.toBeNull();
    await doubleTap(`squad-bring-back-${CATO}`);
    expect(changes()).toEqual([{ method: 'PATCH', url: `/api/teams/${TEAM}/skaters/${CATO}`, body: { retired: false } }]);
    await release();
    await waitFor(() => expect(bannerText('squad-retired-done')).toContain('Cato de Wit is back'));
  });

  it('a coach sees the retired skaters without "Bring back"', async () => {
    renderWith(<SquadList teamId={TEAM} squad={{ groups, skaters: squad }} selectedId={null} onSelect={() => undefined} canManage={false} />);
    await fireWeb(getByTestIdWeb('squad-retired-toggle'), 'onPress');
    expect(queryByTestIdWeb(`squad-skater-${CATO}`)).not.toBeNull();
    expect(queryByTestIdWeb(`squad-bring-back-${CATO}`)).toBeNull();
  });
});

describe('add a skater', () => {
  it('refuses a name the squad has before sending, in the server’s words', async () => {
    renderWith(<AddSkaterForm teamId={TEAM} groups={groups} skaters={squad} />);
    await fireWeb(getByTestIdWeb('squad-add-skater-name'), 'onChangeText', ' anna reede');
    await fireWeb(getByTestIdWeb('squad-add-skater-submit'), 'onPress');
    expect(textOf(getByTestIdWeb('squad-add-skater-name-error'))).toBe('“Anna Reede” is in the squad already: add an initial or a second name');
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('adds a new name once per double tap and pulls it onto the board', async () => {
    serve(({ body }) => ({ status: 201, body: { ...skater('0190a0b0-0000-7000-8000-0000000000f9', 'x'), ...(body as object) } }), true);
    renderWith(<AddSkaterForm teamId={TEAM} groups={groups} skaters={squad} />);
    await fireWeb(getByTestIdWeb('squad-add-skater-name'), 'onChangeText', 'Anna Reede B.');
    await doubleTap('squad-add-skater-submit');
    expect(changes()).toEqual([{ method: 'POST', url: `/api/teams/${TEAM}/skaters`, body: { displayName: 'Anna Reede B.', groupId: null } }]);
    await release();
    await waitFor(() => expect(bannerText('squad-add-skater-done')).toContain('Anna Reede B. is on the squad.'));
    expect(mockRunSync).toHaveBeenCalledWith(TEAM, expect.any(Function));
  });
});

describe('people on the team', () => {
  const members: Member[] = [
    { userId: PARENT, displayName: 'Marijke Reede', email: 'marijke@example.test', role: 'guardian', skaterId: ANNA },
    { userId: ASSISTANT, displayName: 'Sjoerd Bakker', email: 'sjoerd@example.test', role: 'coach', skaterId: null },
    { userId: HEAD, displayName: 'Tjitske Hoogland', email: 'tjitske@example.test', role: 'head_coach', skaterId: null },
    { userId: '0190a0b0-0000-7000-8000-0000000000e4', displayName: 'Berend V', email: 'berend@example.test', role: 'skater', skaterId: BEREND },
  ];
  const membersThen = (removal: { status: number; body?: unknown }) =>
    serve((call) => (call.method === 'GET' ? { status: 200, body: members } : removal));

  it('lists coaches (head coach marked and first), guardians with their skater, skaters who sign in', async () => {
    membersThen({ status: 204 });
    renderWith(<StaffList teamId={TEAM} skaters={squad} currentUserId={HEAD} canManage />);
    await waitFor(() => getByTestIdWeb('staff-coaches'));
    expect(textOf(getByTestIdWeb('staff-coaches'))).toMatch(/Tjitske Hoogland \(you\)Head coach.*Sjoerd BakkerCoach/);
    expect(textOf(getByTestIdWeb(`staff-role-${PARENT}`))).toBe('Guardian of Anna Reede');
    expect(textOf(getByTestIdWeb('staff-skaters'))).toContain('Skater: Berend Visser');
    // Everyone but the head coach themselves can be removed.
    expect(queryByTestIdWeb(`staff-remove-${HEAD}`)).toBeNull();
    expect(queryByTestIdWeb(`staff-remove-${ASSISTANT}`)).not.toBeNull();
  });

  it('removes after a confirm that says they are signed out everywhere, once per double tap', async () => {
    membersThen({ status: 204 });
    renderWith(<StaffList teamId={TEAM} skaters={squad} currentUserId={HEAD} canManage />);
    await waitFor(() => getByTestIdWeb(`staff-remove-${ASSISTANT}`));
    await fireWeb(getByTestIdWeb(`staff-remove-${ASSISTANT}`), 'onPress');
    expect(changes()).toEqual([]);
    const confirm = textOf(getByTestIdWeb(`staff-confirm-${ASSISTANT}`));
    expect(confirm).toContain('signed out on every device');
    expect(confirm).toContain('The notes they wrote stay');

    fetchMock.mockClear();
    serve((call) => (call.method === 'GET' ? { status: 200, body: members.filter((m) => m.userId !== ASSISTANT) } : { status: 204 }), true);
    await doubleTap(`staff-confirm-yes-${ASSISTANT}`);
    expect(changes()).toEqual([{ method: 'DELETE', url: `/api/teams/${TEAM}/members/${ASSISTANT}`, body: undefined }]);
    await release();
    await waitFor(() => expect(bannerText('staff-done')).toContain('Sjoerd Bakker is no longer on the team and is signed out on every device.'));
  });

  it('a refused removal is said in words and the member stays', async () => {
    membersThen({ status: 409, body: { error: { code: 'conflict', message: 'You cannot remove yourself from the team.' } } });
    renderWith(<StaffList teamId={TEAM} skaters={squad} currentUserId={HEAD} canManage />);
    await waitFor(() => getByTestIdWeb(`staff-remove-${PARENT}`));
    await fireWeb(getByTestIdWeb(`staff-remove-${PARENT}`), 'onPress');
    expect(textOf(getByTestIdWeb(`staff-confirm-${PARENT}`))).toContain('so does the skater profile');
    await fireWeb(getByTestIdWeb(`staff-confirm-yes-${PARENT}`), 'onPress');
    await waitFor(() => expect(bannerText('staff-error')).toBe('You cannot remove yourself from the team.'));
    expect(queryByTestIdWeb(`staff-member-${PARENT}`)).not.toBeNull();
  });

  it('a coach sees the people but no "Remove"', async () => {
    membersThen({ status: 204 });
    renderWith(<StaffList teamId={TEAM} skaters={squad} currentUserId={ASSISTANT} canManage={false} />);
    await waitFor(() => getByTestIdWeb('staff-guardians'));
    for (const m of members) expect(queryByTestIdWeb(`staff-remove-${m.userId}`)).toBeNull();
  });
});

describe('invitations', () => {
  const day = 24 * 3600_000;
  const at = (offsetDays: number) => new Date(Date.now() + offsetDays * day).toISOString();
  const invitation = (id: string, email: string, over: Partial<Invitation>): Invitation => ({
    id,
    email,
    role: 'coach',
    skaterId: null,
    createdAt: at(-3),
    expiresAt: at(4),
    acceptedAt: null,
    revokedAt: null,
    ...over,
  });
  const PENDING = '0190a0b0-0000-7000-8000-000000000101';
  const EXPIRED = '0190a0b0-0000-7000-8000-000000000102';
  const REVOKED = '0190a0b0-0000-7000-8000-000000000103';
  const ACCEPTED = '0190a0b0-0000-7000-8000-000000000104';
  const list = [
    invitation(ACCEPTED, 'joined@example.test', { acceptedAt: at(-2) }),
    invitation(EXPIRED, 'late@example.test', { expiresAt: at(-1), role: 'guardian', skaterId: ANNA }),
    invitation(REVOKED, 'oops@example.test', { revokedAt: at(-1) }),
    invitation(PENDING, 'new@example.test', {}),
  ];
  const show = () => renderWith(<InvitationList teamId={TEAM} invitations={list} skaters={squad} />);

  it('says where each stands and offers only what makes sense', () => {
    show();
    expect(textOf(getByTestIdWeb(`invitation-status-${PENDING}`))).toMatch(/^Waiting for an answer · link open until \d+ \w+$/);
    expect(textOf(getByTestIdWeb(`invitation-status-${EXPIRED}`))).toMatch(/^Expired .* the link no longer works$/);
    expect(textOf(getByTestIdWeb(`invitation-status-${REVOKED}`))).toMatch(/^Withdrawn .* the link no longer works$/);
    expect(textOf(getByTestIdWeb(`invitation-status-${ACCEPTED}`))).toMatch(/^Accepted /);
    expect(textOf(getByTestIdWeb(`invitation-${EXPIRED}`))).toContain('Guardian of Anna Reede');
    expect(textOf(getByTestIdWeb('invitations-summary'))).toBe('1 waiting for an answer.');

    expect(queryByTestIdWeb(`invitation-withdraw-${PENDING}`)).not.toBeNull();
    for (const id of [EXPIRED, REVOKED, ACCEPTED]) expect(queryByTestIdWeb(`invitation-withdraw-${id}`)).toBeNull();
    for (const id of [PENDING, EXPIRED, REVOKED]) expect(queryByTestIdWeb(`invitation-resend-${id}`)).not.toBeNull();
    expect(queryByTestIdWeb(`invitation-resend-${ACCEPTED}`)).toBeNull();
  });

  it('withdraws once per double tap and says the link no longer works', async () => {
    serve(() => ({ status: 200, body: { ...list[3], revokedAt: at(0) } }), true);
    show();
    await doubleTap(`invitation-withdraw-${PENDING}`);
    expect(changes()).toEqual([{ method: 'DELETE', url: `/api/teams/${TEAM}/invitations/${PENDING}`, body: undefined }]);
    await release();
    await waitFor(() =>
      expect(bannerText('invitations-done')).toBe('Invitation to new@example.test withdrawn: its link no longer works.'),
    );
  });

  it('sends an expired one again with a fresh link and says until when', async () => {
    serve(() => ({ status: 200, body: { ...list[1], expiresAt: at(7) } }));
    show();
    await fireWeb(getByTestIdWeb(`invitation-resend-${EXPIRED}`), 'onPress');
    await waitFor(() => expect(bannerText('invitations-done')).toMatch(/^Sent again to late@example.test with a fresh link, open until \d+ \w+\. The earlier link no longer works\.$/));
    expect(changes()).toEqual([{ method: 'POST', url: `/api/teams/${TEAM}/invitations/${EXPIRED}/resend`, body: undefined }]);
  });

  it('a refused action is said in words', async () => {
    serve(() => ({ status: 409, body: { error: { code: 'conflict', message: 'This invitation was already accepted.' } } }));
    show();
    await fireWeb(getByTestIdWeb(`invitation-withdraw-${PENDING}`), 'onPress');
    await waitFor(() => expect(bannerText('invitations-error')).toBe('This invitation was already accepted.'));
  });
});

describe('cue library', () => {
  const cue = (id: string, phase: Cue['phase'], label: string, archived = false) =>
    ({ id, teamId: TEAM, phase, label, sortOrder: 1, archived }) as Cue;
  const cues = [
    cue('0190a0b0-0000-7000-8000-000000000201', 'straight', 'Longer glide'),
    cue('0190a0b0-0000-7000-8000-000000000202', 'straight', 'Deeper knee bend'),
    cue('0190a0b0-0000-7000-8000-000000000203', 'curve', 'Hug the blocks', true),
  ];

  it('refuses a label its phase already has; the same words in another phase are fine', async () => {
    renderWith(<CueLibrary teamId={TEAM} cues={cues} onClose={() => undefined} />);
    await fireWeb(getByTestIdWeb('cue-add-input'), 'onChangeText', 'longer GLIDE ');
    await fireWeb(getByTestIdWeb('cue-add-save'), 'onPress');
    expect(textOf(getByTestIdWeb('cue-add-input-error'))).toBe('A cue called “Longer glide” exists already in this phase (Straight).');
    expect(mockEditCue).not.toHaveBeenCalled();

    // An archived twin is named as such.
    await fireWeb(getByTestIdWeb('cue-add-phase-curve'), 'onPress');
    await fireWeb(getByTestIdWeb('cue-add-input'), 'onChangeText', 'Hug the blocks');
    await fireWeb(getByTestIdWeb('cue-add-save'), 'onPress');
    expect(textOf(getByTestIdWeb('cue-add-input-error'))).toContain('An archived cue called “Hug the blocks” exists already in this phase (Curve)');
    expect(mockEditCue).not.toHaveBeenCalled();

    await fireWeb(getByTestIdWeb('cue-add-input'), 'onChangeText', 'Longer glide');
    await fireWeb(getByTestIdWeb('cue-add-save'), 'onPress');
    expect(mockEditCue).toHaveBeenCalledWith({ kind: 'add', phase: 'curve', label: 'Longer glide' });
  });

  it('refuses a rename onto another cue’s label in the same phase', async () => {
    renderWith(<CueLibrary teamId={TEAM} cues={cues} onClose={() => undefined} />);
    await fireWeb(getByTestIdWeb(`cue-rename-${cues[1].id}`), 'onPress');
    await fireWeb(getByTestIdWeb(`cue-rename-input-${cues[1].id}`), 'onChangeText', 'Longer Glide');
    await fireWeb(getByTestIdWeb(`cue-rename-save-${cues[1].id}`), 'onPress');
    expect(textOf(getByTestIdWeb(`cue-rename-input-${cues[1].id}-error`))).toBe('A cue called “Longer glide” exists already in this phase (Straight).');
    expect(mockEditCue).not.toHaveBeenCalled();

    // Its own label in another case is a rename, not a duplicate.
    await fireWeb(getByTestIdWeb(`cue-rename-input-${cues[1].id}`), 'onChangeText', 'Deeper Knee Bend');
    await fireWeb(getByTestIdWeb(`cue-rename-save-${cues[1].id}`), 'onPress');
    expect(mockEditCue).toHaveBeenCalledWith({ kind: 'rename', id: cues[1].id, label: 'Deeper Knee Bend' });
  });
});
