/**
 * Setting up a heat in a few taps: track, distance, a pair (inner and outer lane) or a group of up
 * to six, the skaters (tap a name: it fills the next free lane; tap again to take it out), each
 * skater's target for the distance (set or change it here), the start offset, and the big Start.
 *
 * Start fires on touch-down with the event's own timestamp, like the lane buttons: it is the gun.
 */
import { memo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import type { Skater } from '../../shared/schemas';
import { formatRaceTime } from '../../shared/timing';
import { Button, ChoiceChips, chipStyles, Heading, Text, TextField, colors, radius, spacing } from '../ui';
import { Armband } from './armband';
import {
  DISTANCES,
  GROUP_MAX,
  GUN_AIR_C,
  distanceLabel,
  gunOffsetMs,
  parseOffset,
  planWords,
  soundSpeedMs,
  targetFor,
  type ClockTarget,
} from './clock-math';
import { TapSurface } from './tap-surface';
import { useClockUi, type ClockSetup } from './use-clock';

/** The start offset the setup gives, or an error to show. */
export function setupOffset(setup: ClockSetup): { ms: number; error: string | null } {
  if (setup.offsetMode === 'none') return { ms: 0, error: null };
  if (setup.offsetMode === 'gun') {
    if (!Number.isFinite(setup.gunDistanceM) || setup.gunDistanceM < 0 || setup.gunDistanceM > 1000) {
      return { ms: 0, error: 'Give the distance to the starter in metres (0 to 1000).' };
    }
    return { ms: gunOffsetMs(setup.gunDistanceM), error: null };
  }
  const ms = parseOffset(setup.offsetText);
  return ms === null ? { ms: 0, error: 'Write the offset in seconds, 0 to 5, like 0.30.' } : { ms, error: null };
}

/** The skaters the setup puts in lanes, in lane order. */
export function setupLanes(setup: ClockSetup): { lane: 'inner' | 'outer' | 'group'; skaterId: string }[] {
  if (setup.mode === 'group') return setup.group.map((skaterId) => ({ lane: 'group' as const, skaterId }));
  return [
    ...(setup.inner ? [{ lane: 'inner' as const, skaterId: setup.inner }] : []),
    ...(setup.outer ? [{ lane: 'outer' as const, skaterId: setup.outer }] : []),
  ];
}

export const SetupPanel = memo(function SetupPanel({
  skaters,
  targets,
  onStart,
  onEditTarget,
  starting,
  wide,
  inlineStart,
}: {
  skaters: readonly Skater[];
  targets: readonly ClockTarget[] | undefined;
  onStart: (timeStamp: number) => void;
  onEditTarget: (skaterId: string) => void;
  starting: boolean;
  wide: boolean;
  /** The Start button inside the panel (wide); the phone keeps it in a bar at the bottom. */
  inlineStart: boolean;
}) {
  const setup = useClockUi((s) => s.setup);
  const patch = useClockUi((s) => s.patchSetup);
  const pick = useClockUi((s) => s.pickSkater);
  const swap = useClockUi((s) => s.swapLanes);
  const nameOf = (id: string | null) => skaters.find((s) => s.id === id)?.displayName ?? '';
  const offset = setupOffset(setup);
  const laneOf = (id: string) =>
    setup.mode === 'group'
      ? setup.group.includes(id)
        ? `Skater ${setup.group.indexOf(id) + 1}`
        : null
      : setup.inner === id
        ? 'Inner'
        : setup.outer === id
          ? 'Outer'
          : null;

  const targetLine = (skaterId: string) => {
    const t = targetFor(targets, skaterId, setup.distanceM, setup.track);
    if (setup.distanceM === 0) return null;
    return (
      <View style={styles.targetRow}>
        <Text tone={t ? 'default' : 'muted'} testID={`setup-target-${skaterId}`}>
          {t ? `Target ${formatRaceTime(t.targetMs)}, ${planWords(t)}` : 'No target for this distance'}
        </Text>
        <Button
          label={t ? 'Change target' : 'Set target'}
          accessibilityLabel={`${t ? 'Change target' : 'Set target'} for ${nameOf(skaterId)}`}
          variant="quiet"
          testID={`setup-target-edit-${skaterId}`}
          onPress={() => onEditTarget(skaterId)}
        />
      </View>
    );
  };

  const slot = (lane: 'inner' | 'outer') => {
    const id = setup[lane];
    return (
      <View style={[styles.slot, lane === 'outer' && styles.slotOuter]} testID={`setup-slot-${lane}`}>
        <Armband lane={lane} />
        <Text variant="title" weight="bold" testID={`setup-slot-${lane}-name`} tone={id ? 'default' : 'muted'}>
          {id ? nameOf(id) : 'Tap a skater below'}
        </Text>
        {id ? targetLine(id) : null}
      </View>
    );
  };

  const offsetBlock = (
    <View style={styles.stack}>
      <ChoiceChips
        label="Start signal"
        value={setup.offsetMode}
        onChange={(offsetMode) => patch({ offsetMode })}
        choices={[
          { value: 'none', label: 'Start seen (no offset)', testID: 'setup-offset-none' },
          { value: 'gun', label: 'Gun from the far side', testID: 'setup-offset-gun' },
          { value: 'direct', label: 'Set an offset', testID: 'setup-offset-direct' },
        ]}
        testID="setup-offset"
      />
      {setup.offsetMode === 'gun' ? (
        <View style={styles.stack}>
          <TextField
            label="Distance to the starter (m)"
            value={Number.isFinite(setup.gunDistanceM) ? String(setup.gunDistanceM) : ''}
            onChangeText={(t) => patch({ gunDistanceM: t.trim() === '' ? Number.NaN : Number(t) })}
            error={offset.error}
            inputMode="numeric"
            testID="setup-gun-distance"
          />
          {offset.error ? null : (
            <Text testID="setup-gun-offset">
              {`Adds ${formatRaceTime(offset.ms)} s: sound travels about ${soundSpeedMs()} m/s in ${GUN_AIR_C} °C rink air (about 0.3 s per 100 m).`}
            </Text>
          )}
        </View>
      ) : null}
      {setup.offsetMode === 'direct' ? (
        <TextField
          label="Offset added to every time (s)"
          value={setup.offsetText}
          onChangeText={(offsetText) => patch({ offsetText })}
          error={offset.error}
          hint="The clock started this late after the real start."
          inputMode="decimal"
          testID="setup-offset-text"
        />
      ) : null}
    </View>
  );

  const trackChips = (
    <ChoiceChips
      label="Track"
      value={setup.track}
      onChange={(track) => {
        const distances = DISTANCES[track];
        patch({ track, distanceM: distances.includes(setup.distanceM) ? setup.distanceM : 500 });
      }}
      choices={[
        { value: 'long', label: 'Long track', testID: 'setup-track-long' },
        { value: 'short', label: 'Short track', testID: 'setup-track-short' },
      ]}
      testID="setup-track"
    />
  );
  const distanceChips = (
    <ChoiceChips
      label="Distance"
      value={String(setup.distanceM)}
      onChange={(d) => patch({ distanceM: Number(d) })}
      choices={DISTANCES[setup.track].map((d) => ({ value: String(d), label: distanceLabel(d), testID: `setup-distance-${d}` }))}
      testID="setup-distance"
    />
  );
  const whoChips = (
    <ChoiceChips
      label="Who"
      value={setup.mode}
      onChange={(mode) => patch({ mode })}
      choices={[
        { value: 'pair', label: 'A pair (inner, outer)', testID: 'setup-mode-pair' },
        { value: 'group', label: `A group (up to ${GROUP_MAX})`, testID: 'setup-mode-group' },
      ]}
      testID="setup-mode"
    />
  );
  const lanesBlock =
    setup.mode === 'pair' ? (
      <View style={wide ? styles.row : styles.stack}>
        <View style={wide ? styles.col : undefined}>{slot('inner')}</View>
        <View style={wide ? styles.col : undefined}>{slot('outer')}</View>
      </View>
    ) : (
      <View style={wide ? styles.rowWrap : styles.stack} testID="setup-group">
        {setup.group.length === 0 ? <Text tone="muted">Tap up to six skaters below.</Text> : null}
        {setup.group.map((id, i) => (
          <View key={id} style={[styles.slot, wide && styles.groupSlotWide]} testID={`setup-group-${i + 1}`}>
            <Armband lane="group" number={i + 1} />
            <Text weight="bold" variant="bodyLarge">
              {nameOf(id)}
            </Text>
            {targetLine(id)}
          </View>
        ))}
      </View>
    );
  const skatersBlock = (
    <View style={styles.stack}>
      <Text weight="bold">Skaters</Text>
      {skaters.length === 0 ? (
        <Text tone="muted" testID="setup-no-skaters">
          No skaters on this device yet: add them under Squad (they arrive with the next sync).
        </Text>
      ) : (
        <View style={styles.chips} role="group" aria-label="Skaters">
          {skaters.map((s) => {
            const where = laneOf(s.id);
            return (
              <Pressable
                key={s.id}
                testID={`setup-skater-${s.id}`}
                role="button"
                aria-pressed={!!where}
                onPress={() => pick(s.id)}
                style={[chipStyles.chip, where ? chipStyles.chipOn : null]}
              >
                <Text weight={where ? 'bold' : 'regular'} tone={where ? 'inverse' : 'default'}>
                  {where ? `\u2713 ${s.displayName} \u00B7 ${where}` : s.displayName}
                </Text>
              </Pressable>
            );
          })}
        </View>
      )}
      {setup.mode === 'pair' && (setup.inner || setup.outer) ? (
        <Button label="Swap lanes" variant="secondary" testID="setup-swap" onPress={swap} style={styles.start} />
      ) : null}
    </View>
  );
  const start = inlineStart ? <StartButton skaters={skaters} onStart={onStart} starting={starting} /> : null;

  // Wide: what to time across the top, the lanes side by side, the skaters, then the start signal
  // beside the Start button. Phone: one column in the order a coach sets up.
  if (wide) {
    return (
      <View style={styles.wrap} testID="clock-setup">
        <View style={styles.row}>
          <View style={styles.col}>{trackChips}</View>
          <View style={styles.col}>{whoChips}</View>
        </View>
        {distanceChips}
        {lanesBlock}
        {skatersBlock}
        <View style={styles.row}>
          <View style={styles.col}>{offsetBlock}</View>
          <View style={styles.col}>{start}</View>
        </View>
      </View>
    );
  }
  return (
    <View style={styles.wrap} testID="clock-setup">
      {trackChips}
      {distanceChips}
      {whoChips}
      {lanesBlock}
      {skatersBlock}
      {offsetBlock}
      {start}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: spacing.lg },
  stack: { gap: spacing.sm },
  row: { flexDirection: 'row', gap: spacing.lg, alignItems: 'flex-start' },
  rowWrap: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  col: { flex: 1, minWidth: 0 },
  groupSlotWide: { width: '31%' },
  grow: { flex: 1 },
  slot: {
    gap: spacing.xxs,
    padding: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  slotOuter: {},
  targetRow: { alignItems: 'flex-start' },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  start: { alignSelf: 'flex-start' },
  startButton: {
    minHeight: 96,
    borderRadius: radius.lg,
    backgroundColor: colors.primary,
    alignItems: 'center',
    justifyContent: 'center',
  },
  startOff: { backgroundColor: colors.surfaceSunken, borderWidth: 2, borderColor: colors.border, borderStyle: 'dashed' },
  startInner: { alignItems: 'center' },
  startCompact: { minHeight: 72 },
  startWord: { fontSize: 44, lineHeight: 52, color: colors.onPrimary },
  startWordOff: { color: colors.inkMuted },
});

/**
 * The big Start: fires on touch-down with the event's own time (it is the gun). Says what will be
 * timed under it, so a glance confirms the distance and who is in which lane.
 */
export const StartButton = memo(function StartButton({
  skaters,
  onStart,
  starting,
  compact = false,
}: {
  skaters: readonly Skater[];
  onStart: (timeStamp: number) => void;
  starting: boolean;
  compact?: boolean;
}) {
  const setup = useClockUi((s) => s.setup);
  const nameOf = (id: string | null) => skaters.find((s) => s.id === id)?.displayName ?? '';
  const lanes = setupLanes(setup);
  const offset = setupOffset(setup);
  const ready = lanes.length > 0 && !offset.error && !starting;
  const startLabel =
    lanes.length === 0
      ? 'Start (pick a skater first)'
      : `Start ${distanceLabel(setup.distanceM)}: ${lanes.map((l) => nameOf(l.skaterId)).join(', ')}`;
  const note = (
    <Text tone="muted" variant="caption" testID="clock-start-note" numberOfLines={compact ? 2 : undefined}>
      {lanes.length === 0
        ? 'Pick at least one skater to start.'
        : `${distanceLabel(setup.distanceM)}, ${setup.track} track: ${lanes.map((l) => `${nameOf(l.skaterId)} (${l.lane === 'group' ? 'group' : l.lane})`).join(', ')}${offset.ms ? ` · offset ${formatRaceTime(offset.ms)} s` : ''}. Tap Start on the gun.`}
    </Text>
  );
  const button = (
    <TapSurface
      testID="clock-start"
      label={startLabel}
      hint="Tap on the gun. The time is taken at the touch."
      disabled={!ready}
      onTap={onStart}
      style={[styles.startButton, compact && styles.startCompact, !ready && styles.startOff]}
    >
      <View pointerEvents="none" style={styles.startInner}>
        <Text weight="bold" style={[styles.startWord, !ready && styles.startWordOff]}>
          Start
        </Text>
      </View>
    </TapSurface>
  );
  return (
    <View style={styles.stack}>
      {compact ? note : null}
      {button}
      {compact ? null : note}
    </View>
  );
});
