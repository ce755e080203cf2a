/**
 * What the coach sees of sync: a compact line (last successful sync in server time, changes
 * waiting, refused changes) that opens a panel with a progress bar during a long pull, the last
 * error naming its step, "Sync now", and the refused changes with their reasons, each of which
 * can be sent again or given up.
 */
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import type { OutboxEntry } from '../../sync/store';
import { boardKeys } from '../../store/board';
import { useConnectivity } from '../../store/connectivity';
import { useSession } from '../../store/session';
import {
  discardRejectedChange,
  listRejectedChanges,
  retryRejectedChange,
  runSync,
  useSyncStatus,
} from '../../store/sync-status';
import { Banner, Button, Card, Heading, Text, colors, lastSyncText, radius, spacing, tapTarget } from '../ui';

const tableWords: Record<string, string> = { observations: 'note', sessions: 'session', cues: 'cue', runs: 'timed run', crossings: 'lap time', targets: 'target' };

function useRefetchDevice() {
  const client = useQueryClient();
  return () => void client.invalidateQueries({ queryKey: boardKeys.all });
}

/** The one-line summary; pressing it opens the panel. */
export function SyncSummary({ onOpen }: { onOpen: () => void }) {
  const status = useSyncStatus();
  const online = useConnectivity((s) => s.online);
  let text = lastSyncText(status.lastSyncAt);
  if (status.running) {
    text = status.progress && status.progress.total > 0 ? `Syncing ${status.progress.done} of ${status.progress.total}` : 'Syncing…';
  } else if (!online) {
    text = `Offline · ${text}`;
  }
  const extra = [
    status.pending > 0 ? `${status.pending} waiting` : '',
    status.rejected > 0 ? `${status.rejected} refused` : '',
  ].filter(Boolean);
  return (
    <Pressable
      onPress={onOpen}
      testID="sync-summary"
      accessibilityRole="button"
      // Named by what it shows (speech input users say what they see); it opens the sync details.
      style={({ pressed }) => [styles.summary, pressed && styles.pressed]}
    >
      <Text variant="caption" weight="bold" numberOfLines={1} testID="sync-last">
        {text}
      </Text>
      {extra.length > 0 ? (
        <Text variant="caption" tone={status.rejected > 0 ? 'error' : 'muted'} numberOfLines={1}>
          {extra.join(' · ')}
        </Text>
      ) : null}
    </Pressable>
  );
}

export function SyncPanel({ onClose }: { onClose: () => void }) {
  const status = useSyncStatus();
  const teamId = useSession((s) => s.activeTeamId) ?? '';
  const refetch = useRefetchDevice();
  const rejected = useQuery({
    queryKey: ['device', 'rejected', teamId, status.rejected, status.lastSyncAt],
    queryFn: () => listRejectedChanges(teamId),
    networkMode: 'always',
    enabled: !!teamId,
  });
  const progress = status.progress && status.progress.total > 0 ? status.progress.done / status.progress.total : null;

  return (
    <Card testID="sync-panel" style={styles.panel}>
      <View style={styles.header}>
        <Heading level={2}>Sync</Heading>
        <Button label="Close" variant="quiet" onPress={onClose} testID="sync-close" />
      </View>
      <Text testID="sync-panel-last">{lastSyncText(status.lastSyncAt)}</Text>
      <Text tone="muted" testID="sync-panel-pending">
        {status.pending === 1 ? '1 change waiting to be sent' : `${status.pending} changes waiting to be sent`}
      </Text>
      {status.running ? (
        <View
          style={styles.track}
          testID="sync-progress"
          accessibilityRole="progressbar"
          accessibilityLabel="Sync progress"
          accessibilityValue={progress === null ? undefined : { min: 0, max: 100, now: Math.round(progress * 100) }}
        >
          <View style={[styles.fill, { width: `${Math.round((progress ?? 0.05) * 100)}%` }]} />
        </View>
      ) : null}
      {status.error && !status.running ? (
        <Banner kind="error" testID="sync-error">
          {status.error}
        </Banner>
      ) : null}
      <Button
        label={status.running ? 'Syncing…' : 'Sync now'}
        loading={status.running}
        onPress={() => void runSync(teamId, refetch)}
        testID="sync-now"
      />
      {(rejected.data ?? []).length > 0 ? (
        <View style={styles.rejected} testID="sync-rejected">
          <Heading level={3}>Refused by the server</Heading>
          <Text tone="muted" variant="caption">
            These changes were not accepted. Send one again after fixing what the reason says, or give it up.
          </Text>
          {(rejected.data ?? []).map((entry) => (
            <RejectedRow key={entry.opId} entry={entry} teamId={teamId} onChanged={refetch} />
          ))}
        </View>
      ) : null}
    </Card>
  );
}

function RejectedRow({ entry, teamId, onChanged }: { entry: OutboxEntry; teamId: string; onChanged: () => void }) {
  const [busy, setBusy] = useState(false);
  const what = `${entry.kind === 'delete' ? 'Delete of a' : 'Change to a'} ${tableWords[entry.table] ?? entry.table}`;
  const act = async (action: () => Promise<void>) => {
    setBusy(true);
    try {
      await action();
    } finally {
      setBusy(false);
    }
  };
  return (
    <View style={styles.row} testID={`rejected-${entry.opId}`}>
      <Text weight="bold">{what}</Text>
      <Text tone="error" variant="caption">
        {entry.lastError ?? 'Refused'}
      </Text>
      <View style={styles.actions}>
        <Button
          label="Send again"
          variant="secondary"
          disabled={busy}
          onPress={() => void act(() => retryRejectedChange(teamId, entry.opId, onChanged))}
          testID={`rejected-retry-${entry.opId}`}
        />
        <Button
          label="Give up"
          variant="quiet"
          disabled={busy}
          onPress={() => void act(() => discardRejectedChange(teamId, entry.opId, onChanged))}
          testID={`rejected-discard-${entry.opId}`}
        />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  summary: {
    minHeight: tapTarget,
    justifyContent: 'center',
    paddingHorizontal: spacing.xs,
    borderRadius: radius.sm,
    flexShrink: 1,
  },
  pressed: { backgroundColor: colors.surfaceSunken },
  panel: { gap: spacing.sm, maxWidth: 520, width: '100%' },
  header: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between' },
  track: { height: 12, borderRadius: radius.pill, backgroundColor: colors.surfaceSunken, overflow: 'hidden', borderWidth: 1, borderColor: colors.border },
  fill: { height: '100%', backgroundColor: colors.primary },
  rejected: { gap: spacing.xs, paddingTop: spacing.sm, borderTopWidth: 1, borderTopColor: colors.divider },
  row: { gap: spacing.xxs, paddingVertical: spacing.xs, borderBottomWidth: 1, borderBottomColor: colors.divider },
  actions: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
});
