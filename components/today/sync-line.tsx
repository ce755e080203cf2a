/**
 * The skater's sync line: when this device last heard from the server, "Offline" in words when it
 * cannot, acknowledgements still waiting to be sent, and "Refresh" to sync now.
 */
import { StyleSheet, View } from 'react-native';

import { useSyncStatus } from '../../store/sync-status';
import { Button, OfflineBadge, Text, lastSyncText, spacing } from '../ui';
import { plural } from './format';

export interface SyncLineProps {
  offline: boolean;
  onRefresh: () => void;
}

export function SyncLine({ offline, onRefresh }: SyncLineProps) {
  const { lastSyncAt, running, pending, error } = useSyncStatus();
  return (
    <View style={styles.wrap} testID="today-sync">
      <View style={styles.line}>
        {offline ? (
          <OfflineBadge large testID="today-offline" accessibilityLabel="Offline: your cues are kept on this device" />
        ) : null}
        <Text tone="muted" testID="today-last-sync" style={styles.grow}>
          {running ? 'Syncing…' : lastSyncText(lastSyncAt, 'Last synced')}
        </Text>
        <Button
          label="Refresh"
          variant="secondary"
          testID="today-refresh"
          loading={running}
          onPress={onRefresh}
          accessibilityHint="Fetches new cues from your coaches"
        />
      </View>
      {pending > 0 ? (
        <Text variant="caption" weight="bold" testID="today-pending">
          {plural(pending, 'acknowledgement', 'acknowledgements')} waiting to be sent
        </Text>
      ) : null}
      {error && !running ? (
        <Text variant="caption" tone="error" testID="today-sync-error">
          {offline ? 'Could not reach the server. Your cues on this device are still here.' : error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xxs },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  grow: { flexShrink: 1, flexGrow: 1 },
});
