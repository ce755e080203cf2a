/**
 * Opens the device database before the coach area renders, and makes sure only one browser tab
 * holds it. A second tab says plainly that Boardside is open elsewhere and offers to take over;
 * the tab that hands over says so too. Never a blank page or a raw storage error.
 *
 * Whose notebook: the device holds one person's rows at a time. Before the area renders, the store
 * is opened for the signed-in user (store/device-owner.ts): if someone else used the device last,
 * their rows are wiped first (their unsent changes stay, parked for them). This runs again when a
 * different person signs in within the same tab.
 *
 * Handing over: the browser's SQLite keeps its file handles for as long as its worker lives, so
 * closing the database is not enough. The tab that steps aside finishes its queued writes,
 * closes, remembers (for this tab only) that it moved, and reloads; the reload ends the worker and
 * frees the file for the other tab.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { closeDeviceStore, isDatabaseBusy, openDeviceStore } from '../../sync';
import { claimTab, takeOver } from '../../sync/tab-lock';
import { boardKeys } from '../../store/board';
import { useDevice } from '../../store/device';
import { openDeviceFor } from '../../store/device-owner';
import { useSession } from '../../store/session';
import { Banner, Button, Card, Heading, Loading, Screen, Text, spacing } from '../ui';

/** Set in a tab that handed the database to another tab, so its reload does not grab it back. */
const MOVED_KEY = 'boardside.device.moved';
/** How many times this tab reloaded to wait for a database file another tab was still freeing. */
const RETRY_KEY = 'boardside.device.open-retries';

export function DeviceGate({ children }: { children: ReactNode }) {
  const status = useDevice((s) => s.status);
  const error = useDevice((s) => s.error);
  const client = useQueryClient();
  const userId = useSession((s) => s.user?.id ?? null);
  /** The user the open store holds rows for (children render only once it is this user). */
  const [openFor, setOpenFor] = useState<string | null>(null);

  const leave = useCallback(async () => {
    useDevice.getState().set('moved');
    await closeDeviceStore();
    client.removeQueries({ queryKey: boardKeys.all });
    sessionStorage.setItem(MOVED_KEY, '1');
    window.location.reload();
  }, [client]);

  const open = useCallback(async () => {
    try {
      await openDeviceStore();
      sessionStorage.removeItem(RETRY_KEY);
      useDevice.getState().set('ready');
    } catch (e) {
      // The tab that let go may still be unloading and holding the file. This page's database
      // worker cannot recover from that, but a fresh page can: reload and try again, a few times.
      const retries = Number(sessionStorage.getItem(RETRY_KEY) ?? 0);
      if (isDatabaseBusy(e) && retries < 3) {
        sessionStorage.setItem(RETRY_KEY, String(retries + 1));
        await new Promise((resolve) => setTimeout(resolve, 300));
        window.location.reload();
        return;
      }
      sessionStorage.removeItem(RETRY_KEY);
      useDevice.getState().set('failed', e instanceof Error ? e.message : String(e));
    }
  }, []);

  useEffect(() => {
    if (useDevice.getState().status !== 'opening') return;
    if (typeof sessionStorage !== 'undefined' && sessionStorage.getItem(MOVED_KEY)) {
      useDevice.getState().set('moved');
      return;
    }
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

  useEffect(() => {
    if (status !== 'ready' || !userId) return;
    let cancelled = false;
    void openDeviceFor(userId).then(
      () => {
        if (!cancelled) setOpenFor(userId);
      },
      (e: unknown) => {
        if (!cancelled) useDevice.getState().set('failed', e instanceof Error ? e.message : String(e));
      },
    );
    return () => {
      cancelled = true;
    };
  }, [status, userId]);

  const useHere = async () => {
    sessionStorage.removeItem(MOVED_KEY);
    useDevice.getState().set('opening');
    const ownership = await takeOver(leave);
    if (ownership.state === 'elsewhere') return useDevice.getState().set('elsewhere');
    // The other tab lets go of the lock as it unloads; give its database worker a moment to end.
    await new Promise((resolve) => setTimeout(resolve, 400));
    await open();
  };

  if (status === 'ready') {
    return openFor !== null && openFor === userId ? <>{children}</> : <Loading label="Opening your notebook on this device…" testID="device-opening" />;
  }
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
