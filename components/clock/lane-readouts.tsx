/**
 * What one lane shows while it is timed, big enough to read from the boards with cold eyes: the
 * skater, the last section (lap) time largest, then the split and where it was taken, km/h, the
 * gap to the schedule (figure and word), laps to go and the predicted finish. `density` trims it
 * for six skaters on a phone (lap, split, gap, to go).
 *
 * Every figure has a testID per lane so the tests read exactly what the coach reads.
 */
import { StyleSheet, View } from 'react-native';

import { Text, colors, fonts, spacing } from '../ui';
import { Armband } from './armband';
import type { ClockLane, LaneReadout } from './clock-math';
import { GapBadge } from './gap-badge';

export type Density = 'roomy' | 'pair' | 'compact';

export function LaneReadouts({
  readout,
  name,
  lane,
  number,
  density,
  hasTarget,
  status,
  testID,
}: {
  readout: LaneReadout;
  name: string;
  lane: ClockLane;
  number?: number;
  density: Density;
  hasTarget: boolean;
  /** Shown instead of the "tap" prompt when the run is over. */
  status: string | null;
  testID: string;
}) {
  const compact = density === 'compact';
  // The last lap is the lane's largest figure; a lap of a minute or more ("1:02.31") gets a size
  // that still fits the card's width.
  const long = (readout.lastLap ?? '').length > 5;
  const lapSize = density === 'roomy' ? 88 : compact ? (long ? 30 : 36) : long ? 46 : 56;
  const valueSize = density === 'roomy' ? 34 : compact ? 20 : 28;
  const value = { fontSize: valueSize, lineHeight: Math.round(valueSize * 1.15) };
  return (
    <View style={[styles.wrap, compact && styles.wrapCompact]} testID={testID}>
      {compact ? (
        // One line: the numbered band and the name.
        <View style={styles.head}>
          <Armband lane={lane} number={number} size="sm" bandOnly />
          <Text weight="bold" numberOfLines={1} style={styles.grow} testID={`${testID}-name`}>
            {name}
          </Text>
        </View>
      ) : (
        <>
          <View style={styles.head}>
            <Armband lane={lane} number={number} size="md" />
          </View>
          <Text weight="bold" variant="title" numberOfLines={2} testID={`${testID}-name`}>
            {name}
          </Text>
        </>
      )}

      <View>
        {compact ? null : (
          <Text variant="caption" tone="muted" testID={`${testID}-section`} numberOfLines={1}>
            {readout.lastName
              ? `${readout.lastName}${readout.lastName === 'Opener' || readout.lastName === 'Finish' ? '' : ' time'}`
              : 'Waiting for the first crossing'}
          </Text>
        )}
        <Text style={[styles.lap, { fontSize: lapSize, lineHeight: Math.round(lapSize * 1.05) }]} testID={`${testID}-lap`}>
          {readout.lastLap ?? '—'}
        </Text>
      </View>

      <View style={styles.line}>
        <Text variant="caption" tone="muted">
          Split
        </Text>
        <Text style={[styles.value, value]} testID={`${testID}-split`}>
          {readout.lastSplit ?? '—'}
        </Text>
        {readout.lastAt && !compact ? (
          <Text variant="caption" tone="muted" testID={`${testID}-at`}>
            {`at ${readout.lastAt}`}
          </Text>
        ) : null}
      </View>

      {compact ? null : (
        <View style={styles.line}>
          <Text style={[styles.value, value]} testID={`${testID}-kmh`}>
            {readout.kmh ?? '—'}
          </Text>
          <Text variant="caption" tone="muted">
            km/h
          </Text>
        </View>
      )}

      {readout.gap ? (
        <GapBadge gap={readout.gap} size={compact ? 'sm' : density === 'roomy' ? 'lg' : 'md'} testID={`${testID}-gap`} />
      ) : hasTarget || compact ? null : (
        <Text variant="caption" tone="muted" testID={`${testID}-no-target`}>
          No target set: no gap
        </Text>
      )}

      <Text weight="bold" variant={compact ? 'caption' : 'body'} testID={`${testID}-togo`}>
        {readout.toGo}
      </Text>
      {readout.predicted && !compact && !readout.finished ? (
        <View style={styles.line}>
          <Text variant="caption" tone="muted">
            Finish about
          </Text>
          <Text style={[styles.value, value]} testID={`${testID}-predicted`}>
            {readout.predicted}
          </Text>
        </View>
      ) : null}
      {status ? (
        <Text weight="bold" variant={compact ? 'caption' : 'body'} testID={`${testID}-status`} style={styles.status}>
          {status}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xxs, padding: spacing.sm, flexGrow: 1 },
  wrapCompact: { padding: spacing.xs, gap: 0 },
  head: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  grow: { flex: 1, minWidth: 0 },
  lap: { fontFamily: fonts.numbers, color: colors.ink },
  line: { flexDirection: 'row', alignItems: 'baseline', flexWrap: 'wrap', columnGap: spacing.xs },
  value: { fontFamily: fonts.numbers, color: colors.ink },
  status: { marginTop: 'auto' },
});
