/**
 * One lane while a heat runs: the whole card is the button (a tap anywhere on it is a crossing,
 * stamped at touch-down), with the lane's readouts drawn over it; under the card, away from the
 * tap zone so a glove cannot hit them by accident, Undo and Stop. Stop opens the reasons in place
 * of the card (never over the other lane, whose skater is still racing).
 *
 * Memoised: a crossing on one lane repaints that lane only.
 */
import { memo, useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button, Text, colors, radius, spacing } from '../ui';
import { laneWord, type ClockLane, type LaneReadout } from './clock-math';
import { LaneReadouts, type Density } from './lane-readouts';
import { TapSurface } from './tap-surface';

export const STOP_REASONS = ['Fall', 'Disqualified', 'Stopped skating', 'Missed the finish tap'] as const;

export type LaneView = {
  runId: string;
  /** Stable test key: inner, outer, group-1 … group-6. */
  key: string;
  lane: ClockLane;
  number?: number;
  name: string;
  status: 'running' | 'finished' | 'stopped';
  stopReason: string;
  readout: LaneReadout;
  hasTarget: boolean;
  free: boolean;
};

export type LaneButtonProps = {
  view: LaneView;
  density: Density;
  /** Undo and Stop under the card (a group on a phone has one strip for all lanes instead). */
  controls?: boolean;
  onTap: (runId: string, timeStamp: number) => void;
  onUndo: (runId: string) => void;
  onStop: (runId: string, reason: string) => void;
  onFinish: (runId: string) => void;
  onResume: (runId: string) => void;
};

export const LaneButton = memo(function LaneButton({ view, density, controls = true, onTap, onUndo, onStop, onFinish, onResume }: LaneButtonProps) {
  const [choosing, setChoosing] = useState(false);
  const [flash, setFlash] = useState(false);
  const flashTimer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(flashTimer.current), []);
  const running = view.status === 'running';
  const first = view.name.split(/\s+/)[0] || view.name;
  const where = view.lane === 'group' ? `skater ${view.number ?? ''}`.trim() : `${laneWord(view.lane).toLowerCase()} lane`;
  const k = view.key;

  const tap = (ts: number) => {
    onTap(view.runId, ts);
    setFlash(true);
    clearTimeout(flashTimer.current);
    flashTimer.current = setTimeout(() => setFlash(false), 160);
  };

  const status =
    view.status === 'finished'
      ? `\u2713 Finished ${view.readout.lastSplit ?? ''}`.trim()
      : view.status === 'stopped'
        ? `\u25A0 Stopped: ${view.stopReason || 'no reason given'}`
        : null;

  if (choosing && running) {
    return (
      <View style={styles.column} testID={`lane-${k}`}>
        <View style={[styles.card, styles.choose]} testID={`lane-${k}-stop-sheet`} role="group" aria-label={`Stop ${view.name}`}>
          <Text weight="bold">{view.free ? `End ${first}’s laps` : `Stop ${first}: why?`}</Text>
          {view.free ? (
            <Button label="Done: laps finished" testID={`lane-${k}-done`} onPress={() => { setChoosing(false); onFinish(view.runId); }} />
          ) : null}
          {STOP_REASONS.filter((r) => !view.free || r !== 'Missed the finish tap').map((reason) => (
            <Button
              key={reason}
              label={reason}
              variant="secondary"
              testID={`lane-${k}-reason-${reason.split(' ')[0].toLowerCase()}`}
              onPress={() => {
                setChoosing(false);
                onStop(view.runId, reason);
              }}
            />
          ))}
          <Button label="Keep timing" variant="quiet" testID={`lane-${k}-stop-cancel`} onPress={() => setChoosing(false)} />
        </View>
      </View>
    );
  }

  return (
    <View style={styles.column} testID={`lane-${k}`}>
      {/* The button is the whole card, border included; the readouts are drawn over it. */}
      <View style={styles.cardBox}>
        {running ? (
          <TapSurface
            testID={`lane-tap-${k}`}
            label={`${view.name}, ${where}: crossed the line`}
            hint="Tap as the skater's skate crosses the finish line"
            onTap={tap}
            style={[StyleSheet.absoluteFill, styles.card, flash && styles.cardFlash]}
          />
        ) : (
          <View style={[StyleSheet.absoluteFill, styles.card, styles.cardDone]} />
        )}
        <View pointerEvents="none" style={styles.overlay}>
          <LaneReadouts
            readout={view.readout}
            name={view.name}
            lane={view.lane}
            number={view.number}
            density={density}
            hasTarget={view.hasTarget}
            status={status}
            testID={`lane-${k}`}
          />
          {running && density !== 'compact' ? (
            <Text variant="caption" weight="bold" align="center" style={styles.prompt} aria-hidden>
              {`Tap as ${first} crosses`}
            </Text>
          ) : null}
        </View>
      </View>
      {controls ? (
        <View style={styles.controls}>
          <Button
            label="Undo"
            variant="secondary"
            testID={`lane-${k}-undo`}
            accessibilityLabel={`Undo ${first}’s last crossing`}
            disabled={view.readout.crossings === 0 || view.status === 'stopped'}
            onPress={() => onUndo(view.runId)}
            style={styles.control}
          />
          {running ? (
            <Button
              label={view.free ? 'End' : 'Stop'}
              variant="secondary"
              testID={`lane-${k}-stop`}
              accessibilityLabel={view.free ? `End ${first}’s laps` : `Stop ${first} (fall, disqualification…)`}
              onPress={() => setChoosing(true)}
              style={styles.control}
            />
          ) : view.status === 'stopped' ? (
            <Button
              label="Resume"
              variant="secondary"
              testID={`lane-${k}-resume`}
              accessibilityLabel={`Resume timing ${first}`}
              onPress={() => onResume(view.runId)}
              style={styles.control}
            />
          ) : null}
        </View>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  column: { flex: 1, minWidth: 0, gap: 6 },
  cardBox: { flex: 1, minHeight: 120 },
  card: {
    borderRadius: radius.lg,
    borderWidth: 3,
    borderColor: colors.primary,
    backgroundColor: colors.surface,
  },
  cardDone: { borderColor: colors.border, borderStyle: 'dashed', backgroundColor: colors.surfaceSunken },
  cardFlash: { backgroundColor: colors.infoSurface },
  choose: { flex: 1, padding: spacing.sm, gap: spacing.xs, justifyContent: 'flex-start' },
  // Drawn over the card, clipped to it: the lanes' heights come from the screen, never from
  // their text (six lanes on a phone must share the room exactly).
  overlay: { position: 'absolute', top: 0, right: 0, bottom: 0, left: 0, padding: 3, overflow: 'hidden' },
  prompt: { color: colors.primary, paddingBottom: spacing.xs },
  controls: { flexDirection: 'row', gap: 6 },
  control: { flex: 1, paddingHorizontal: spacing.xs },
});
