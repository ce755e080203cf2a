/**
 * Undo and Stop for a group of up to six on a phone: one strip under the lanes instead of two
 * buttons under every lane, so the six lane buttons keep half the screen. "Undo…" and "Stop…"
 * turn the strip into the skaters' numbers (the numbers on their armbands); a number undoes that
 * lane's last crossing, or offers the reasons to stop it. The strip never covers a lane: the other
 * skaters can be timed while the coach chooses. It falls back to its two buttons after a few
 * seconds without a choice.
 */
import { memo, useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button, spacing } from '../ui';
import type { LaneView } from './lane-button';
import { useClockUi } from './use-clock';

type Mode = { kind: 'idle' } | { kind: 'undo' } | { kind: 'stop' } | { kind: 'reason'; runId: string };

const GROUP_REASONS = ['Fall', 'Disqualified', 'Stopped skating'] as const;

export const GroupControls = memo(function GroupControls({
  lanes,
  onUndo,
  onStop,
  onFinish,
  onResume,
}: {
  lanes: LaneView[];
  onUndo: (runId: string) => void;
  onStop: (runId: string, reason: string) => void;
  onFinish: (runId: string) => void;
  onResume: (runId: string) => void;
}) {
  const [mode, setMode] = useState<Mode>({ kind: 'idle' });
  useEffect(() => {
    if (mode.kind === 'idle') return;
    const timer = setTimeout(() => setMode({ kind: 'idle' }), 8000);
    return () => clearTimeout(timer);
  }, [mode]);
  const idle = () => setMode({ kind: 'idle' });
  const first = (v: LaneView) => v.name.split(/\s+/)[0] || v.name;

  if (mode.kind === 'idle') {
    return (
      <View style={styles.row} testID="group-controls">
        <Button
          label="Undo…"
          variant="secondary"
          testID="group-undo"
          accessibilityLabel="Undo…: pick a skater"
          onPress={() => {
            setMode({ kind: 'undo' });
            // The strip has no room for words: the line under the clock says what the numbers do.
            useClockUi.getState().say('info', 'Undo: tap the skater’s number for their last crossing (\u2715 cancels).');
          }}
          style={styles.grow}
        />
        <Button
          label="Stop…"
          variant="secondary"
          testID="group-stop"
          accessibilityLabel="Stop…: pick a skater"
          onPress={() => {
            setMode({ kind: 'stop' });
            useClockUi.getState().say('info', 'Stop: tap the skater’s number, then the reason (\u2715 cancels).');
          }}
          style={styles.grow}
        />
      </View>
    );
  }

  if (mode.kind === 'reason') {
    const view = lanes.find((l) => l.runId === mode.runId);
    if (!view) return null;
    const done = (fn: () => void) => () => {
      fn();
      idle();
    };
    return (
      <View style={styles.row} testID="group-reasons" role="group" aria-label={`Stop ${view.name}`}>
        {view.status === 'stopped' ? (
          <Button label="Resume" testID="group-resume" accessibilityLabel={`Resume timing ${first(view)}`} onPress={done(() => onResume(view.runId))} style={styles.grow} />
        ) : (
          <>
            {view.free ? <Button label="Done" testID="group-reason-done" accessibilityLabel={`Done: ${first(view)}’s laps finished`} onPress={done(() => onFinish(view.runId))} style={styles.grow} /> : null}
            {GROUP_REASONS.map((reason) => (
              <Button
                key={reason}
                label={reason === 'Stopped skating' ? 'Stopped' : reason === 'Disqualified' ? 'DQ' : reason}
                accessibilityLabel={`${reason === 'Stopped skating' ? 'Stopped' : reason === 'Disqualified' ? 'DQ' : reason}: ${reason.toLowerCase()}, ${first(view)}`}
                variant="secondary"
                testID={`group-reason-${reason.split(' ')[0].toLowerCase()}`}
                onPress={done(() => onStop(view.runId, reason))}
                style={styles.grow}
              />
            ))}
          </>
        )}
        <Button label={'\u2715'} accessibilityLabel={'\u2715 Keep timing'} variant="quiet" testID="group-cancel" onPress={idle} />
      </View>
    );
  }

  const undo = mode.kind === 'undo';
  return (
    <View style={styles.row} testID={undo ? 'group-undo-pick' : 'group-stop-pick'} role="group" aria-label={undo ? 'Undo which skater’s last crossing' : 'Stop which skater'}>
      {lanes.map((view) => {
        const allowed = undo ? view.readout.crossings > 0 && view.status !== 'stopped' : view.status !== 'finished';
        return (
          <Button
            key={view.runId}
            label={String(view.number ?? '')}
            accessibilityLabel={`${view.number}: ${undo ? `undo ${first(view)}’s last crossing` : `stop ${first(view)}`}`}
            variant="secondary"
            disabled={!allowed}
            testID={`group-${undo ? 'undo' : 'stop'}-${view.number}`}
            onPress={() => {
              if (undo) {
                onUndo(view.runId);
                idle();
              } else setMode({ kind: 'reason', runId: view.runId });
            }}
            style={styles.number}
          />
        );
      })}
      <Button label={'\u2715'} accessibilityLabel={'\u2715 Cancel'} variant="quiet" testID="group-cancel" onPress={idle} />
    </View>
  );
});

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: 4, minHeight: 48 },
  grow: { flex: 1, paddingHorizontal: spacing.xxs },
  number: { flex: 1, paddingHorizontal: 0 },
});
