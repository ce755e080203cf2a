/**
 * A run after (or during) the race: every section with its lap time, the split, km/h and the gap
 * to the schedule, the skater's final time and status. A coach tidies it here: edit a crossing's
 * time, mark it hand-timed, delete a mis-tap, add a crossing that was missed (hand-timed from
 * another watch), mark the run finished once its last split is in, and go to the skater's notes.
 *
 * A table for screen readers (row and column headers). Each section name is the button that
 * opens its editor, so the figures stay in their columns on a 390 px phone.
 */
import { memo, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { formatRaceTime, parseRaceTime } from '../../shared/timing';
import { Banner, Button, Text, TextField, ToggleRow, colors, fonts, radius, spacing } from '../ui';
import { Armband } from './armband';
import {
  distanceLabel,
  layoutFor,
  planWords,
  rowLabel,
  runTable,
  tableLegend,
  trackLabel,
  type ClockRun,
  type ClockTarget,
  type TableRow,
} from './clock-math';
import type { PaceEntry } from '../../shared/timing';

export type RunTableActions = {
  onEditCrossing: (id: string, patch: { atMs?: number; handTimed?: boolean }) => Promise<unknown>;
  onDeleteCrossing: (id: string) => Promise<unknown>;
  onAddCrossing: (runId: string, atMs: number) => Promise<unknown>;
  onMarkFinished: (runId: string) => Promise<unknown>;
  onOpenSkater: (skaterId: string) => void;
};

export type RunTableProps = RunTableActions & {
  run: ClockRun;
  name: string;
  number?: number;
  schedule?: PaceEntry[];
  target?: ClockTarget;
  wide: boolean;
  /** While the heat still runs the table follows it read-only. */
  live?: boolean;
  testID: string;
};

const statusWords = (run: ClockRun, finalSplit: string | null, rows: readonly TableRow[]) =>
  run.status === 'finished'
    ? finalSplit
      ? `\u2713 Finished in ${finalSplit}`
      : rows.length > 0
        ? `\u2713 Finished: ${rows.length} ${rows.length === 1 ? 'lap' : 'laps'} in ${rows[rows.length - 1].split}`
        : '\u2713 Finished'
    : run.status === 'stopped'
      ? `\u25A0 Stopped: ${run.stopReason || 'no reason given'}`
      : '\u25B6 Running';

function problemFor(run: ClockRun, atMs: number, exceptId?: string): string | null {
  const others = run.crossings.filter((c) => c.id !== exceptId).map((c) => c.atMs);
  if (others.includes(atMs)) return 'Another crossing has this exact time.';
  if (!exceptId && run.distanceM > 0 && others.length >= layoutFor(run.distanceM, run.track).splitsAtM.length) {
    return 'Every split of this distance has a time already: edit one instead.';
  }
  return null;
}

export const RunTable = memo(function RunTable(props: RunTableProps) {
  const { run, name, number, schedule, target, wide, live = false, testID } = props;
  const rows = useMemo(() => runTable(run, schedule), [run, schedule]);
  const legend = tableLegend(rows, !!schedule, 'the');
  const layout = layoutFor(run.distanceM, run.track, run.crossings.length);
  const complete = !layout.free && run.crossings.length === layout.splitsAtM.length;
  const finalSplit = complete ? rows[rows.length - 1]?.split ?? null : null;
  const [editing, setEditing] = useState<string | null>(null);
  const [adding, setAdding] = useState(false);
  const first = name.split(/\s+/)[0] || name;

  return (
    <View style={styles.wrap} testID={testID}>
      <View style={styles.head}>
        <Armband lane={run.lane} number={number} size="sm" />
        <Text variant="title" weight="bold" style={styles.grow} testID={`${testID}-name`}>
          {name}
        </Text>
      </View>
      <Text testID={`${testID}-what`}>
        {`${distanceLabel(run.distanceM)} · ${trackLabel(run.track)}${run.startOffsetMs ? ` · start offset ${formatRaceTime(run.startOffsetMs)} s` : ''}`}
      </Text>
      <Text weight="bold" variant="bodyLarge" testID={`${testID}-status`}>
        {statusWords(run, finalSplit, rows)}
      </Text>
      {run.targetMs ? (
        <Text tone="muted" testID={`${testID}-target`}>
          {`Target ${formatRaceTime(run.targetMs)}${target && target.targetMs === run.targetMs ? `, ${planWords(target)}` : ''}`}
        </Text>
      ) : null}

      {rows.length === 0 ? (
        <Text tone="muted" testID={`${testID}-empty`}>
          No crossings recorded.
        </Text>
      ) : (
        <View role="table" aria-label={`${name}: laps and splits`} style={styles.table}>
          <View role="row" style={[styles.row, styles.headRow]}>
            <Cell header first>
              Section
            </Cell>
            {wide ? <Cell header>At</Cell> : null}
            <Cell header>Lap</Cell>
            <Cell header>Split</Cell>
            <Cell header>km/h</Cell>
            {schedule ? <Cell header>Gap</Cell> : null}
          </View>
          {rows.map((row) => (
            <Row
              key={row.crossingId}
              row={row}
              wide={wide}
              showGap={!!schedule}
              testID={`${testID}-row-${row.index}`}
              editable={!live}
              open={editing === row.crossingId}
              onOpen={() => setEditing((e) => (e === row.crossingId ? null : row.crossingId))}
            />
          ))}
        </View>
      )}
      {legend ? (
        <Text variant="caption" tone="muted">
          {legend}
        </Text>
      ) : null}

      {editing ? (
        <CrossingEditor
          key={editing}
          run={run}
          row={rows.find((r) => r.crossingId === editing)!}
          testID={`${testID}-edit`}
          onClose={() => setEditing(null)}
          actions={props}
        />
      ) : null}

      {!live ? (
        <View style={styles.actions}>
          {complete && run.status !== 'finished' ? (
            <Button label="Mark finished" variant="secondary" testID={`${testID}-mark-finished`} onPress={() => void props.onMarkFinished(run.id)} />
          ) : null}
          {adding ? null : (
            <Button label="Add a missed crossing" variant="secondary" testID={`${testID}-add`} onPress={() => setAdding(true)} />
          )}
          <Button
            label={`Open ${first} on the Board`}
            variant="quiet"
            testID={`${testID}-skater`}
            onPress={() => props.onOpenSkater(run.skaterId)}
          />
        </View>
      ) : null}
      {adding ? <AddCrossing run={run} testID={`${testID}-add`} onClose={() => setAdding(false)} onAdd={props.onAddCrossing} /> : null}
    </View>
  );
});

function Cell({ children, header = false, first = false, testID }: { children: React.ReactNode; header?: boolean; first?: boolean; testID?: string }) {
  return (
    <View role={header ? 'columnheader' : first ? 'rowheader' : 'cell'} style={[styles.cell, first && styles.firstCell]} testID={testID}>
      {typeof children === 'string' ? (
        <Text variant="caption" weight={header ? 'bold' : 'regular'} tone={header ? 'muted' : 'default'} style={header ? undefined : styles.figure}>
          {children}
        </Text>
      ) : (
        children
      )}
    </View>
  );
}

function Row({
  row,
  wide,
  showGap,
  testID,
  editable,
  open,
  onOpen,
}: {
  row: TableRow;
  wide: boolean;
  showGap: boolean;
  testID: string;
  editable: boolean;
  open: boolean;
  onOpen: () => void;
}) {
  return (
    <View role="row" style={[styles.row, open && styles.rowOpen]} testID={testID}>
      <Cell first>
        {editable ? (
          <Button
            label={rowLabel(row)}
            accessibilityLabel={`${rowLabel(row)}: edit`}
            variant="quiet"
            testID={`${testID}-edit`}
            onPress={onOpen}
            style={styles.rowButton}
          />
        ) : (
          <Text variant="caption" weight="bold">
            {rowLabel(row)}
          </Text>
        )}
      </Cell>
      {wide ? <Cell testID={`${testID}-at`}>{row.atM}</Cell> : null}
      <Cell testID={`${testID}-lap`}>{row.lap}</Cell>
      <Cell testID={`${testID}-split`}>{row.split}</Cell>
      <Cell testID={`${testID}-kmh`}>{row.kmh}</Cell>
      {showGap ? (
        <Cell testID={`${testID}-gap`}>
          {row.gap ? (
            <Text variant="caption" weight="bold" style={[styles.figure, { color: row.gap.side === 'behind' ? '#7A2E00' : row.gap.side === 'ahead' ? '#0A3A7A' : colors.ink }]}>
              {row.gap.text}
            </Text>
          ) : (
            <Text variant="caption">—</Text>
          )}
        </Cell>
      ) : null}
    </View>
  );
}

function CrossingEditor({
  run,
  row,
  testID,
  onClose,
  actions,
}: {
  run: ClockRun;
  row: TableRow;
  testID: string;
  onClose: () => void;
  actions: RunTableActions;
}) {
  const crossing = run.crossings.find((c) => c.id === row.crossingId);
  const initial = crossing ? formatRaceTime(crossing.atMs) : '';
  const [text, setText] = useState(initial);
  const [hand, setHand] = useState(crossing?.handTimed ?? false);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [confirmDelete, setConfirmDelete] = useState(false);
  if (!crossing) return null;

  const save = async () => {
    const patch: { atMs?: number; handTimed?: boolean } = {};
    if (text.trim() !== initial) {
      let atMs: number;
      try {
        atMs = parseRaceTime(text);
      } catch (e) {
        setError(e instanceof Error ? e.message : String(e));
        return;
      }
      if (atMs <= 0) return setError('A crossing comes after the start.');
      const problem = problemFor(run, atMs, crossing.id);
      if (problem) return setError(problem);
      patch.atMs = atMs;
    }
    if (hand !== crossing.handTimed) patch.handTimed = hand;
    if (Object.keys(patch).length === 0) return onClose();
    setBusy(true);
    try {
      await actions.onEditCrossing(crossing.id, patch);
      onClose();
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
    } finally {
      setBusy(false);
    }
  };

  const remove = async () => {
    setBusy(true);
    try {
      await actions.onDeleteCrossing(crossing.id);
      onClose();
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
      setBusy(false);
    }
  };

  return (
    <View style={styles.editor} testID={testID} role="group" aria-label={`Edit ${row.name}`}>
      <Text weight="bold">{`Edit ${row.name} (split ${row.split})`}</Text>
      <TextField
        label="Split time (from the gun)"
        value={text}
        onChangeText={(t) => {
          setText(t);
          setError(null);
        }}
        error={error}
        hint="Like 1:02.31. Crossings are kept in time order: a new time re-sorts the laps."
        testID={`${testID}-time`}
        autoCorrect={false}
        inputMode="decimal"
      />
      <ToggleRow label="Hand-timed" hint="Taken from another watch, not tapped here" value={hand} onChange={setHand} testID={`${testID}-hand`} />
      <View style={styles.actions}>
        <Button label="Save" testID={`${testID}-save`} loading={busy} onPress={() => void save()} />
        <Button label="Cancel" variant="secondary" testID={`${testID}-cancel`} onPress={onClose} />
      </View>
      {confirmDelete ? (
        <Banner kind="error" title="Delete this crossing?" testID={`${testID}-confirm`}>
          <Text style={{ color: colors.error }}>The laps either side of it join into one.</Text>
          <View style={styles.actions}>
            <Button label="Delete crossing" testID={`${testID}-delete-yes`} onPress={() => void remove()} />
            <Button label="Keep it" variant="secondary" testID={`${testID}-delete-no`} onPress={() => setConfirmDelete(false)} />
          </View>
        </Banner>
      ) : (
        <Button label="Delete this crossing" variant="quiet" testID={`${testID}-delete`} onPress={() => setConfirmDelete(true)} />
      )}
    </View>
  );
}

function AddCrossing({
  run,
  testID,
  onClose,
  onAdd,
}: {
  run: ClockRun;
  testID: string;
  onClose: () => void;
  onAdd: (runId: string, atMs: number) => Promise<unknown>;
}) {
  const [text, setText] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const add = async () => {
    let atMs: number;
    try {
      atMs = parseRaceTime(text);
    } catch (e) {
      return setError(e instanceof Error ? e.message : String(e));
    }
    if (atMs <= 0) return setError('A crossing comes after the start.');
    const problem = problemFor(run, atMs);
    if (problem) return setError(problem);
    setBusy(true);
    try {
      await onAdd(run.id, atMs);
      onClose();
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
      setBusy(false);
    }
  };
  return (
    <View style={styles.editor} testID={`${testID}-form`}>
      <TextField
        label="Missed crossing: split time from the gun"
        value={text}
        onChangeText={(t) => {
          setText(t);
          setError(null);
        }}
        error={error}
        hint="Saved as hand-timed. Like 1:02.31."
        testID={`${testID}-time`}
        autoCorrect={false}
        inputMode="decimal"
      />
      <View style={styles.actions}>
        <Button label="Add crossing" testID={`${testID}-save`} loading={busy} onPress={() => void add()} />
        <Button label="Cancel" variant="secondary" testID={`${testID}-cancel`} onPress={onClose} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs },
  head: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  grow: { flex: 1 },
  table: { borderTopWidth: 2, borderTopColor: colors.primary },
  row: { flexDirection: 'row', alignItems: 'center', minHeight: 48, borderBottomWidth: 1, borderBottomColor: colors.divider },
  headRow: { minHeight: 32 },
  rowOpen: { backgroundColor: colors.surfaceSunken },
  cell: { flex: 1, minWidth: 0, paddingHorizontal: 2 },
  firstCell: { flex: 1.3 },
  figure: { fontFamily: fonts.numbers, fontSize: 20, lineHeight: 24 },
  rowButton: { paddingHorizontal: 0, alignItems: 'flex-start', minWidth: 0 },
  editor: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, borderWidth: 2, borderColor: colors.primary, backgroundColor: colors.surface },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, alignItems: 'center' },
});
