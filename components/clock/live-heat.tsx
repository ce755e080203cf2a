/**
 * The heat while it runs. Phone (390 × 844): the elapsed clock across the top (the largest figures
 * on the screen), a one-line notice slot under it (a double tap ignored, an undo), then the lanes
 * filling the rest of the height — side by side for a pair, two columns of three for a group — each
 * lane card one big button, with Undo and Stop under it; the ice caution last. Nothing scrolls.
 * Wide (>= 1024 px): the same clock bigger, the lanes side by side on the left and the heat's table
 * following every crossing on the right.
 *
 * The screen's data and actions come from the clock screen; this file only lays them out.
 */
import { memo, useEffect, useState, type ReactNode } from 'react';
import { ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';

import { Button, Text, colors, radius, spacing } from '../ui';
import { ClockCaution } from './clock-caution';
import { distanceLabel, trackLabel } from './clock-math';
import { ElapsedClock } from './elapsed-clock';
import { GroupControls } from './group-controls';
import { LaneButton, type LaneButtonProps, type LaneView } from './lane-button';
import { useClockUi, type LiveHeat as Heat } from './use-clock';
import type { WakeState } from './wake-lock';

export type LiveHeatProps = Omit<LaneButtonProps, 'view' | 'density'> & {
  heat: Heat;
  lanes: LaneView[];
  wide: boolean;
  wake: WakeState;
  onEnd: () => void;
  /** The heat's table (wide layout only). */
  table?: ReactNode;
};

/** Expected characters of the elapsed time for a distance ("38.12", "1:52.43", "13:12.33"). */
const clockChars = (distanceM: number) => (distanceM > 0 && distanceM <= 500 ? 5 : distanceM > 0 && distanceM <= 1500 ? 7 : 8);

export const LiveHeatView = memo(function LiveHeatView({ heat, lanes, wide, wake, onEnd, table, ...actions }: LiveHeatProps) {
  const { width } = useWindowDimensions();
  const voiceOn = useClockUi((s) => s.voiceOn);
  const setVoice = useClockUi((s) => s.setVoice);
  const [confirmEnd, setConfirmEnd] = useState(false);
  useEffect(() => {
    if (!confirmEnd) return;
    const timer = setTimeout(() => setConfirmEnd(false), 8000);
    return () => clearTimeout(timer);
  }, [confirmEnd]);

  // The clock's digits sized to the room beside the two small buttons (condensed figures are
  // a little under half as wide as they are tall).
  const contentWidth = wide ? width - 248 - 2 * spacing.xl : width - 2 * spacing.xs;
  const room = wide ? Math.min(contentWidth * 0.55, 760) : contentWidth - 112;
  const fontSize = Math.max(48, Math.min(wide ? 140 : 96, Math.floor(room / (clockChars(heat.distanceM) * 0.45))));
  const group = lanes.length > 2;
  const density = group ? 'compact' : wide ? 'roomy' : 'pair';

  const top = (
    <View style={styles.top}>
      <View style={styles.clockCol}>
        <ElapsedClock startPerfTs={heat.startPerfTs} offsetMs={heat.offsetMs} running fontSize={fontSize} approximate={heat.resumed} />
        <InfoSlot heat={heat} wake={wake} />
      </View>
      <View style={styles.topButtons}>
        <Button
          label={voiceOn ? '\u2713 Voice' : 'Voice off'}
          accessibilityLabel={voiceOn ? '\u2713 Voice: splits read aloud (on)' : 'Voice off: splits not read aloud'}
          variant="secondary"
          testID="clock-voice"
          onPress={() => setVoice(!voiceOn)}
          style={styles.smallButton}
        />
        <Button
          label={confirmEnd ? 'Sure? End' : 'End'}
          accessibilityLabel={confirmEnd ? 'Sure? End timing now' : 'End timing for everyone'}
          variant={confirmEnd ? 'primary' : 'secondary'}
          testID="clock-end"
          onPress={() => {
            if (confirmEnd) {
              setConfirmEnd(false);
              onEnd();
            } else setConfirmEnd(true);
          }}
          style={styles.smallButton}
        />
      </View>
    </View>
  );

  // A group: rows of two (phone) or three (wide) equal cells that share the height.
  const perRow = group ? (wide ? 3 : 2) : lanes.length;
  const rows: LaneView[][] = [];
  for (let i = 0; i < lanes.length; i += perRow) rows.push(lanes.slice(i, i + perRow));
  const strip = group && !wide;
  const lanesView = (
    <View style={styles.lanes} testID="clock-lanes">
      {rows.map((row, r) => (
        <View key={r} style={styles.laneRow}>
          {row.map((view) => (
            <View key={view.runId} style={styles.cell}>
              <LaneButton view={view} density={density} controls={!strip} {...actions} />
            </View>
          ))}
          {/* An odd last row keeps its cells the width of the others. */}
          {row.length < perRow ? Array.from({ length: perRow - row.length }, (_, k) => <View key={`gap-${k}`} style={styles.cell} />) : null}
        </View>
      ))}
    </View>
  );

  const body = (
    <>
      {top}
      {wide ? (
        <View style={styles.wideRow}>
          <View style={styles.wideLanes}>{lanesView}</View>
          {table ? (
            <ScrollView
              style={styles.tablePane}
              contentContainerStyle={styles.tableContent}
              testID="clock-live-table"
              // It scrolls on its own: keyboard users reach it too.
              {...({ tabIndex: 0, role: 'region', 'aria-label': 'Laps and splits so far' } as object)}
            >
              {table}
            </ScrollView>
          ) : null}
        </View>
      ) : (
        lanesView
      )}
      {strip ? (
        <GroupControls lanes={lanes} onUndo={actions.onUndo} onStop={actions.onStop} onFinish={actions.onFinish} onResume={actions.onResume} />
      ) : null}
      <ClockCaution short />
    </>
  );

  // Wide: the page is exactly the window (the table pane scrolls on its own); a phone scrolls
  // only if it is shorter than the layout needs.
  return wide ? (
    <View style={[styles.fill, styles.page, styles.pageWide]} testID="clock-live">
      {body}
    </View>
  ) : (
    <ScrollView style={styles.fill} contentContainerStyle={styles.page} testID="clock-live">
      {body}
    </ScrollView>
  );
});

/**
 * Two lines under the clock, always the same height (nothing under a thumb moves when it
 * changes): a notice (a double tap ignored, an undo) for a few seconds; otherwise the heat's
 * distance, and that the clock was resumed or cannot keep the screen on.
 */
function InfoSlot({ heat, wake }: { heat: Heat; wake: WakeState }) {
  const notice = useClockUi((s) => s.notice);
  const clear = useClockUi((s) => s.clearNotice);
  useEffect(() => {
    if (!notice) return;
    const timer = setTimeout(clear, 4000);
    return () => clearTimeout(timer);
  }, [notice, clear]);
  const what = `${distanceLabel(heat.distanceM)} · ${trackLabel(heat.track)}${heat.offsetMs ? ` · offset ${(heat.offsetMs / 1000).toFixed(2)} s` : ''}`;
  const extra = heat.resumed
    ? { id: 'clock-resumed', text: '\u2248 Resumed: saved times exact, clock from device time.' }
    : wake === 'unsupported' || wake === 'refused'
      ? { id: 'clock-wake', text: 'This browser cannot keep the screen on: keep it awake.' }
      : null;
  return (
    <View style={styles.slot} role="status" aria-live="polite" testID="clock-notice">
      {notice ? (
        <Text
          variant="caption"
          weight="bold"
          numberOfLines={2}
          testID={`clock-notice-${notice.kind}`}
          style={notice.kind === 'error' ? { color: colors.error } : undefined}
        >
          {notice.kind === 'error' ? `\u26A0 ${notice.text}` : notice.text}
        </Text>
      ) : extra ? (
        <Text variant="caption" weight="bold" numberOfLines={2} testID={extra.id}>
          {extra.text}
        </Text>
      ) : (
        <Text variant="caption" tone="muted" numberOfLines={2} testID="clock-heat-what">
          {what}
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1, backgroundColor: colors.background },
  page: { flexGrow: 1, padding: spacing.xs, gap: 6 },
  pageWide: { padding: spacing.xl, gap: spacing.md },
  top: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  clockCol: { flex: 1, minWidth: 0 },
  topButtons: { gap: spacing.xs, width: 104 },
  smallButton: { paddingHorizontal: spacing.xs },
  slot: { height: 44, justifyContent: 'flex-start' },
  lanes: { flex: 1, gap: 6, minHeight: 360 },
  laneRow: { flex: 1, flexDirection: 'row', gap: spacing.xs },
  cell: { flex: 1, minWidth: 0 },
  wideRow: { flex: 1, flexDirection: 'row', gap: spacing.lg, minHeight: 420 },
  wideLanes: { flex: 2, minWidth: 0 },
  tablePane: {
    flex: 1,
    maxWidth: 480,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
  tableContent: { padding: spacing.md, gap: spacing.xl },
});
