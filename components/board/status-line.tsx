/**
 * The board's status line: the day, "Offline" in plain words when the server cannot be reached
 * (or the coach was signed in from this device's memory), and how many changes wait on this
 * device to be sent. Read at a glance; nothing here needs a tap.
 */
import { memo, useMemo } from 'react';
import { StyleSheet, View } from 'react-native';

import { usePendingSummary } from '../../store/board';
import { OfflineBadge, Text, spacing } from '../ui';
import { formatDay } from './format';

export type StatusLineProps = {
  day: string;
  offline: boolean;
  /** Changes waiting on this device, and the same in words ("24 notes and 1 session waiting to be sent"). */
  pending: { total: number; text: string };
  title?: string;
  rink?: string;
  /** The phone board: one short line ("2 waiting to be sent"; the full wording is its label). */
  compact?: boolean;
};

export function StatusLine({ day, offline, pending, title, rink, compact = false }: StatusLineProps) {
  const place = [title, rink].filter(Boolean).join(' · ');
  // Intl date formatting is slow, and this line re-renders after every tap (the waiting count).
  const dayLabel = useMemo(() => formatDay(day), [day]);
  return (
    <View style={styles.line} testID="status-line">
      <Text weight="bold" variant={compact ? 'body' : 'bodyLarge'} testID="status-day">
        {dayLabel}
        {place ? <Text tone="muted">{`  ${place}`}</Text> : null}
      </Text>
      <View style={styles.right}>
        {offline ? (
          <OfflineBadge testID="status-offline" accessibilityLabel="Offline: notes are kept on this device" />
        ) : null}
        <Text
          variant="caption"
          tone={pending.total > 0 ? 'default' : 'muted'}
          weight={pending.total > 0 ? 'bold' : 'regular'}
          testID="status-pending"
          accessibilityLabel={compact ? pending.text : undefined}
          numberOfLines={compact ? 1 : undefined}
        >
          {compact && pending.total > 0 ? `${pending.total} waiting to be sent` : pending.text}
        </Text>
      </View>
    </View>
  );
}

/**
 * The status line with the board's own count of waiting changes: it alone re-renders when that
 * count moves (after every tap), not the board around it.
 */
export const BoardStatusLine = memo(function BoardStatusLine(props: Omit<StatusLineProps, 'pending'>) {
  const pending = usePendingSummary();
  return <StatusLine {...props} pending={pending} />;
});

const styles = StyleSheet.create({
  line: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    justifyContent: 'space-between',
    columnGap: spacing.md,
    rowGap: spacing.xxs,
  },
  right: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
});
