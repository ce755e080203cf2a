/**
 * The review's Export and print section against a faked API answering like
 * server/routes/review-export.ts: the default range (the last four weeks in the team's zone),
 * fields checked before asking (nothing sent), a group's skaters in one tap, the download's query
 * and the rows and size said afterwards, the server's refusal shown under its field, and the
 * weekly sheet opened with its counts and a Print button calling window.print().
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, waitFor } from '@testing-library/react-native';
import { useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { ExportSection } from '../../components/review/export/export-section';
import type { WeeklySheet } from '../../shared/schemas/review-export';
import { weekOf } from '../../shared/weeks';
import { countCsvRecords, defaultExportRange } from '../../store/review-export';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const TEAM = '0190a0b0-0000-7000-8000-000000000001';
const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';
const BEREND = '0190a0b0-0000-7000-8000-0000000000b2';
const CEES = '0190a0b0-0000-7000-8000-0000000000c3';
const SPRINT = '0190a0b0-0000-7000-8000-0000000000d1';
const SIT = '0190a0b0-0000-7000-8000-0000000000f1';
const RUN = '0190a0b0-0000-7000-8000-0000000000e1';
const ZONE = 'America/Toronto';

const skaters = [
  { id: ANNA, displayName: 'Anna Reede', groupId: SPRINT, hasAccount: false, retired: false },
  { id: BEREND, displayName: 'Berend Visser', groupId: SPRINT, hasAccount: true, retired: false },
  { id: CEES, displayName: 'Cees Oud', groupId: null, hasAccount: false, retired: true },
];
const groups = [{ id: SPRINT, name: 'Sprint', sortOrder: 0 }];

const CSV = 'day,iso_week,note\r\n2026-10-01,2026-W40,"two\r\nlines, ""quoted"""\r\n2026-10-02,2026-W40,\'=1\r\n';
const sheet: WeeklySheet = {
  timeZone: ZONE,
  week: '2026-W40',
  firstDay: '2026-09-28',
  lastDay: '2026-10-04',
  skater: { id: ANNA, displayName: 'Anna Reede', groupName: 'Sprint' },
  cues: [{ cueId: SIT, phase: 'straight', label: 'Sit lower', needsWork: 3, good: 1 }],
  notes: [{ id: '0190a0b0-0000-7000-8000-0000000000f9', day: '2026-09-30', time: '18:05', phase: 'straight', cueLabel: 'Sit lower', mark: 'good', note: 'Much lower today', authorName: 'Marit' }],
  runs: [{ id: RUN, day: '2026-10-03', time: '10:00', distanceM: 500, track: 'long', status: 'finished', finish: '38.73', laps: ['10.45', '28.28'], target: '39.15' }],
};

const fetchMock = jest.fn();
const urls = () => fetchMock.mock.calls.map(([u]) => new URL(String(u), 'http://x'));
let refuse: { status: number; body: unknown } | null = null;

function csvResponse(text: string) {
  return {
    status: 200,
    ok: true,
    headers: {
      get: (name: string) =>
        ({ 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="boardside-observations-2026-09-28-2026-10-04.csv"' })[
          name.toLowerCase()
        ] ?? null,
    },
    text: async () => text,
  } as unknown as Response;
}

const saved: { name: string; size: number }[] = [];
beforeEach(() => {
  refuse = null;
  saved.length = 0;
  fetchMock.mockReset();
  fetchMock.mockImplementation((url: string) => {
    const u = new URL(url, 'http://x');
    if (refuse) return Promise.resolve(fakeResponse(refuse.status, refuse.body));
    if (u.pathname.endsWith('/export.csv')) return Promise.resolve(csvResponse(CSV));
    if (u.pathname.endsWith('/sheet')) return Promise.resolve(fakeResponse(200, sheet));
    return Promise.resolve(fakeResponse(404, { error: { code: 'not_found', message: 'no route' } }));
  });
  global.fetch = fetchMock as unknown as typeof fetch;
  URL.createObjectURL = jest.fn((blob: Blob) => {
    saved.push({ name: 'blob', size: blob.size });
    return 'blob:boardside/1';
  });
  URL.revokeObjectURL = jest.fn();
  jest.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
    saved[saved.length - 1].name = this.download;
  });
});
afterEach(() => jest.restoreAllMocks());

function Harness({ wide }: { wide: boolean }) {
  const [skaterId, setSkaterId] = useState<string | null>(null);
  return (
    <ExportSection teamId={TEAM} skaters={skaters} groups={groups} skaterId={skaterId} group="all" onPickSkater={setSkaterId} timeZone={ZONE} wide={wide} />
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
const type = (id: string, value: string) => fireWeb(getByTestIdWeb(id), 'onChangeText', value);
const text = (id: string) => textOf(getByTestIdWeb(id));

describe('export and print', () => {
  it('starts on the last four weeks in the team zone, every skater, and says private notes are included', () => {
    renderSection();
    const range = defaultExportRange(ZONE);
    expect(getByTestIdWeb('export-from').props.value).toBe(range.from);
    expect(getByTestIdWeb('export-to').props.value).toBe(range.to);
    const days = (Date.parse(range.to) - Date.parse(range.from)) / 86_400_000 + 1;
    expect(days).toBe(28);
    expect(text('export-who')).toBe('Every skater, retired ones too');
    expect(getByTestIdWeb('export-all-skaters').props['aria-checked']).toBe(true);
    expect(text('export-private-note')).toMatch(/private notes too.*only coaches can export.*America\/Toronto/);
  });

  it('checks the fields before asking: a bad day, a range backwards, no skater picked', async () => {
    renderSection(false);
    await type('export-from', '2026-02-30');
    await tap('export-download');
    expect(text('export-from-error')).toMatch(/from must be a real day/);
    await type('export-from', '2026-10-05');
    await type('export-to', '2026-10-04');
    await tap('export-download');
    expect(text('export-from-error')).toBe('from (2026-10-05) must not be after to (2026-10-04)');
    await type('export-from', '2025-01-01');
    await type('export-to', '2026-01-02');
    await tap('export-download');
    expect(text('export-to-error')).toMatch(/at most 366 days/);
    await type('export-to', '2025-01-31');
    // One skater on, then off again: nobody is picked.
    await tap(`export-skater-${ANNA}`);
    await tap(`export-skater-${ANNA}`);
    await tap('export-download');
    expect(text('export-skaters-error')).toMatch(/Pick at least one skater/);
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it("downloads a group's skaters as runs and says the rows and size", async () => {
    renderSection();
    await type('export-from', '2026-09-28');
    await type('export-to', '2026-10-04');
    await tap('export-kind-runs');
    await tap(`export-group-${SPRINT}`);
    expect(getByTestIdWeb(`export-group-${SPRINT}`).props['aria-checked']).toBe(true);
    expect(getByTestIdWeb(`export-skater-${ANNA}`).props['aria-checked']).toBe(true);
    expect(getByTestIdWeb(`export-skater-${CEES}`).props['aria-checked']).toBe(false);
    expect(text('export-who')).toBe('2 skaters picked');
    await tap('export-download');
    await shown('export-done');
    const [url] = urls();
    expect(url.pathname).toBe(`/api/teams/${TEAM}/review/export.csv`);
    expect(Object.fromEntries(url.searchParams)).toEqual({ kind: 'runs', from: '2026-09-28', to: '2026-10-04', skaterIds: `${ANNA},${BEREND}` });
    const bytes = CSV.length; // ASCII: one byte a character
    expect(text('export-done')).toContain(`boardside-observations-2026-09-28-2026-10-04.csv: 2 rows under the header, ${bytes} B.`);
    expect(saved).toEqual([{ name: 'boardside-observations-2026-09-28-2026-10-04.csv', size: bytes }]);
  });

  it('shows the server’s refusal under its field', async () => {
    refuse = { status: 400, body: { error: { code: 'validation', message: 'skaterIds names an id that is not a skater of this team', fields: { skaterIds: 'skaterIds names an id that is not a skater of this team (x)' } } } };
    renderSection();
    await tap(`export-skater-${BEREND}`);
    await tap('export-download');
    await shown('export-error');
    expect(text('export-error')).toMatch(/not a skater of this team/);
    expect(text('export-skaters-error')).toMatch(/skaterIds names an id that is not a skater of this team \(x\)/);
    expect(queryByTestIdWeb('export-done')).toBeNull();
  });

  it('opens the weekly sheet for a skater and week, with its counts, shared notes, runs and a Print button', async () => {
    const print = jest.fn();
    window.print = print;
    renderSection();
    expect(getByTestIdWeb('sheet-week').props.value).toBe(weekOf(Date.now(), ZONE));
    await tap('sheet-open');
    expect(text('sheet-skater-error')).toMatch(/Pick the skater/);
    await tap(`sheet-skater-${ANNA}`);
    await type('sheet-week', '2025-W53');
    await tap('sheet-open');
    expect(text('sheet-week-error')).toMatch(/2026-W05/);
    await type('sheet-week', '2026-W40');
    await tap('sheet-open');
    await shown('weekly-sheet-name');
    expect(urls().map((u) => `${u.pathname}?${u.searchParams}`)).toEqual([`/api/teams/${TEAM}/review/skaters/${ANNA}/sheet?week=2026-W40`]);
    expect(text('weekly-sheet-name')).toBe('Anna Reede');
    expect(text('weekly-sheet-week')).toBe('Week 40 of 2026 (2026-W40) · Mon 28 Sep – Sun 4 Oct 2026');
    expect(text(`weekly-sheet-cue-${SIT}-needs-work`)).toBe('3');
    expect(text(`weekly-sheet-cue-${SIT}-good`)).toBe('1');
    expect(text(`weekly-sheet-run-${RUN}-finish`)).toBe('38.73 (target 39.15)');
    expect(text('weekly-sheet')).toContain('Much lower today');
    expect(text('weekly-sheet')).toContain('10.45  28.28');
    await tap('weekly-sheet-print');
    expect(print).toHaveBeenCalledTimes(1);
    // The print stylesheet is in the page while the sheet is open, and leaves with it.
    expect(document.getElementById('boardside-weekly-sheet-print')?.textContent).toMatch(/@media print/);
    await tap('weekly-sheet-close');
    expect(document.getElementById('boardside-weekly-sheet-print')).toBeNull();
    expect(getByTestIdWeb('sheet-week').props.value).toBe('2026-W40');
  });

  it('keeps a busy week on one page: at most 10 notes and 10 runs, and says how many are left off', async () => {
    const busy: WeeklySheet = {
      ...sheet,
      notes: Array.from({ length: 13 }, (_, i) => ({ ...sheet.notes[0], id: `0190a0b0-0000-7000-8000-0000000001${String(i).padStart(2, '0')}`, note: `note ${i}` })),
      runs: Array.from({ length: 11 }, (_, i) => ({ ...sheet.runs[0], id: `0190a0b0-0000-7000-8000-0000000002${String(i).padStart(2, '0')}` })),
    };
    fetchMock.mockImplementation(() => Promise.resolve(fakeResponse(200, busy)));
    renderSection();
    await tap(`sheet-skater-${ANNA}`);
    await tap('sheet-open');
    await shown('weekly-sheet-name');
    expect(text('weekly-sheet')).toContain('note 9');
    expect(text('weekly-sheet')).not.toContain('note 10');
    expect(text('weekly-sheet-more-notes')).toBe('3 more shared notes this week are not on this page (the first 10 are).');
    expect(text('weekly-sheet-more-runs')).toBe('1 more run this week is not on this page (the first 10 are).');
  });

  it('counts CSV records with quoted line breaks and doubled quotes', () => {
    expect(countCsvRecords(CSV)).toBe(2);
    expect(countCsvRecords('a,b\r\n')).toBe(0);
    expect(countCsvRecords('a\n1\n2')).toBe(2);
  });
});
