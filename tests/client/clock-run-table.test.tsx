/**
 * A run's table after the race (jest-expo/web): every section's lap, split, km/h and gap; a
 * crossing's time edited (typed like 1:27.50), marked hand-timed, or deleted after a second "are
 * you sure"; a missed crossing added as hand-timed; a time that is not a race time, or one another
 * crossing already has, refused with the reason and nothing saved; "Mark finished" once the last
 * split is in.
 */
import { render, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { RunTable } from '../../components/clock/run-table';
import type { ClockRun } from '../../components/clock/clock-math';
import { paceSchedule } from '../../shared/timing';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const run = (over: Partial<ClockRun> = {}): ClockRun => ({
  id: 'run-1',
  heatId: 'heat-1',
  skaterId: 'anna',
  day: '2026-12-02',
  distanceM: 1500,
  track: 'long',
  lane: 'inner',
  startedAt: '2026-12-02T10:00:00.000Z',
  startOffsetMs: 0,
  targetMs: 118_000,
  status: 'finished',
  stopReason: '',
  note: '',
  crossings: [
    { id: 'c0', atMs: 24_310, handTimed: false },
    { id: 'c1', atMs: 55_930, handTimed: false },
    { id: 'c2', atMs: 87_410, handTimed: false },
    { id: 'c3', atMs: 118_950, handTimed: false },
  ],
  ...over,
});

function renderTable(r: ClockRun) {
  const actions = {
    onEditCrossing: jest.fn(async () => undefined),
    onDeleteCrossing: jest.fn(async () => undefined),
    onAddCrossing: jest.fn(async () => undefined),
    onMarkFinished: jest.fn(async () => undefined),
    onOpenSkater: jest.fn(),
  };
  render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <RunTable run={r} name="Anna Reede" schedule={paceSchedule(1500, 118_000)} wide={false} testID="run" {...actions} />
    </SafeAreaProvider>,
  );
  return actions;
}

const text = (id: string) => textOf(getByTestIdWeb(id));
const press = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');
const type = (id: string, value: string) => fireWeb(getByTestIdWeb(id), 'onChangeText', value);

describe('RunTable', () => {
  it('shows every section with lap, split, km/h and gap, and the finish', () => {
    renderTable(run());
    expect(text('run-status')).toBe('\u2713 Finished in 1:58.95');
    expect(text('run-target')).toBe('Target 1:58.00');
    expect([0, 1, 2, 3].map((i) => [text(`run-row-${i}-lap`), text(`run-row-${i}-split`), text(`run-row-${i}-kmh`), text(`run-row-${i}-gap`)])).toEqual([
      ['24.31', '24.31', '44.43', '+0.71'],
      ['31.62', '55.93', '45.54', '+0.86'],
      ['31.48', '1:27.41', '45.74', '+0.87'],
      ['31.54', '1:58.95', '45.66', '+0.95'],
    ]);
  });

  it('edits a crossing’s time and marks it hand-timed', async () => {
    const actions = renderTable(run());
    await press('run-row-2-edit');
    expect(text('run-edit')).toContain('Edit Lap 2');
    await type('run-edit-time', '1:27.50');
    await press('run-edit-hand');
    await press('run-edit-save');
    expect(actions.onEditCrossing).toHaveBeenCalledWith('c2', { atMs: 87_500, handTimed: true });
    await waitFor(() => expect(queryByTestIdWeb('run-edit')).toBeNull());
  });

  it('refuses a time that is not one, or one another crossing has; nothing is saved', async () => {
    const actions = renderTable(run());
    await press('run-row-1-edit');
    await type('run-edit-time', 'half a minute');
    await press('run-edit-save');
    expect(text('run-edit-time-error')).toContain('not a race time');
    await type('run-edit-time', '24.31');
    await press('run-edit-save');
    expect(text('run-edit-time-error')).toBe('Another crossing has this exact time.');
    expect(actions.onEditCrossing).not.toHaveBeenCalled();
  });

  it('deletes a crossing only after "are you sure"', async () => {
    const actions = renderTable(run());
    await press('run-row-1-edit');
    await press('run-edit-delete');
    expect(actions.onDeleteCrossing).not.toHaveBeenCalled();
    expect(text('run-edit-confirm')).toContain('The laps either side of it join into one.');
    await press('run-edit-delete-yes');
    expect(actions.onDeleteCrossing).toHaveBeenCalledWith('c1');
  });

  it('adds a missed crossing as hand-timed (a run stopped for a missed finish tap)', async () => {
    const missing = run({ status: 'stopped', stopReason: 'Missed the finish tap', crossings: run().crossings.slice(0, 3) });
    const actions = renderTable(missing);
    expect(text('run-status')).toBe('\u25A0 Stopped: Missed the finish tap');
    expect(queryByTestIdWeb('run-mark-finished')).toBeNull();
    await press('run-add');
    await type('run-add-time', '1:58.95');
    await press('run-add-save');
    expect(actions.onAddCrossing).toHaveBeenCalledWith('run-1', 118_950);
  });

  it('"Mark finished" shows for a complete run that is not finished', async () => {
    const actions = renderTable(run({ status: 'stopped', stopReason: 'Missed the finish tap' }));
    await press('run-mark-finished');
    expect(actions.onMarkFinished).toHaveBeenCalledWith('run-1');
  });

  it('refuses a fifth crossing on a 1500 m (four splits)', async () => {
    const actions = renderTable(run());
    await press('run-add');
    await type('run-add-time', '2:10.00');
    await press('run-add-save');
    expect(text('run-add-time-error')).toContain('Every split of this distance has a time already');
    expect(actions.onAddCrossing).not.toHaveBeenCalled();
  });
});
