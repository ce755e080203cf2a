/**
 * Opens the device database before the coach area renders, and makes sure only one browser tab
 * holds it. A second tab says plainly that Boardside is open elsewhere and offers to take over;
 * the tab that hands over says so too. Never a blank page or a raw storage error.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { closeDeviceStore, openDeviceStore } from '../../sync';
import { claimTab, takeOver } from '../../sync/tab-lock';
import { boardKeys } from '../../store/board';
import { useDevice } from '../../store/device';
import { Banner, Button, Card, Heading, Loading, Screen, Text, spacing } from '../ui';

export function DeviceGate({ children }: { children: ReactNode }) {
  const status = useDevice((s) => s.status);
  const error = useDevice((s) => s.error);
  const client = useQueryClient();

  const leave = useCallback(async () => {
    useDevice.getState().set('moved');
    await closeDeviceStore();
    client.removeQueries({ queryKey: boardKeys.all });
  }, [client]);

  const open = useCallback(async () => {
    try {
      await openDeviceStore();
      useDevice.getState().set('ready');
    } catch (e) {
      useDevice.getState().set('failed', e instanceof Error ? e.message : String(e));
    }
  }, []);

  useEffect(() => {
    if (useDevice.getState().status !== 'opening') return;
    let cancelled = false;
    void claimTab(leave).then(async (ownership) => {
      if (cancelled) return;
      if (ownership.state === 'elsewhere') useDevice.getState().set('elsewhere');
      else await open();
    });
    return () => {
      cancelled = true;
    };
  }, [leave, open]);

  const useHere = async () => {
    useDevice.getState().set('opening');
    const ownership = await takeOver(leave);
    if (ownership.state === 'elsewhere') useDevice.getState().set('elsewhere');
    else await open();
  };

  if (status === 'ready') return <>{children}</>;
  if (status === 'opening') return <Loading label="Opening this device's notebook…" testID="device-opening" />;

  const title =
    status === 'elsewhere'
      ? 'Boardside is open in another tab'
      : status === 'moved'
        ? 'Boardside moved to another tab'
        : 'This device’s notebook could not be opened';
  const body =
    status === 'elsewhere'
      ? 'Your notes live in one place on this device, and another tab has them open. Use that tab, or bring Boardside here: the other tab will step aside, and nothing recorded there is lost.'
      : status === 'moved'
        ? 'Another tab took over this device’s notebook. Everything you recorded here is saved.'
        : 'Reload the page. If it keeps happening, close other Boardside tabs and try again.';

  return (
    <Screen testID={`device-${status}`} centered>
      <View style={styles.center}>
        <Card>
          <Heading level={2}>{title}</Heading>
          <Text>{body}</Text>
          {status === 'failed' && error ? (
            <Banner kind="error" testID="device-error">
              {error}
            </Banner>
          ) : null}
          {status !== 'failed' ? (
            <Button label="Use Boardside in this tab" onPress={() => void useHere()} testID="device-take-over" />
          ) : null}
        </Card>
      </View>
    </Screen>
  );
}

const styles = StyleSheet.create({
  center: { flex: 1, justifyContent: 'center', gap: spacing.md, maxWidth: 560, width: '100%', alignSelf: 'center' },
});
