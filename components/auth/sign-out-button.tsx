/**
 * "Sign out", for the coach area and the skater's page. On a shared device (a club tablet, a family
 * phone) the next person must not see what this person could read, and this person must not lose
 * what they recorded: signing out empties the device of their rows and keeps their unsent changes,
 * parked for them. When there are such changes, a short dialog says so plainly and offers to send
 * them first; signing out never waits for the server (store/auth.ts).
 */
import { useRef, useState } from 'react';
import { Modal, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';

import { useSignOut } from '../../store/auth';
import { unsentOnDevice } from '../../store/device-owner';
import { useActiveMembership } from '../../store/session';
import { runSync, useSyncStatus } from '../../store/sync-status';
import { Banner, Button, Card, Heading, Text, spacing } from '../ui';

const changes = (n: number) => (n === 1 ? '1 change' : `${n} changes`);

export function SignOutButton({ style }: { style?: StyleProp<ViewStyle> }) {
  const signOut = useSignOut();
  const teamId = useActiveMembership()?.teamId ?? null;
  const [checking, setChecking] = useState(false);
  /** Unsent changes found when "Sign out" was pressed; the dialog is open while this is set. */
  const [unsent, setUnsent] = useState<number | null>(null);
  const [sending, setSending] = useState(false);
  /** Why "Send them first" left changes behind (the sync's own words), or null. */
  const [sendError, setSendError] = useState<string | null>(null);

  const close = () => {
    setUnsent(null);
    setSendError(null);
  };
  const press = async () => {
    if (checking || signOut.isPending) return;
    setChecking(true);
    const waiting = await unsentOnDevice();
    setChecking(false);
    if (waiting > 0) setUnsent(waiting);
    else signOut.mutate();
  };
  const confirm = () => {
    close();
    signOut.mutate();
  };
  /** Set at the first tap, before any re-render: a gloved second tap finds it and does nothing. */
  const sendingRef = useRef(false);
  const sendFirst = async () => {
    if (!teamId || sendingRef.current) return;
    sendingRef.current = true;
    setSending(true);
    setSendError(null);
    await runSync(teamId);
    const left = await unsentOnDevice();
    sendingRef.current = false;
    setSending(false);
    if (left === 0) {
      confirm();
      return;
    }
    setUnsent(left);
    setSendError(useSyncStatus.getState().error ?? 'The server kept some of them back: see the sync panel for the reasons.');
  };

  return (
    <>
      <Button
        label="Sign out"
        variant="quiet"
        testID="sign-out"
        loading={checking || signOut.isPending}
        onPress={() => void press()}
        style={style}
      />
      <Modal visible={unsent !== null} transparent animationType="none" onRequestClose={close}>
        <View style={styles.backdrop}>
          <Card testID="sign-out-dialog" style={styles.card}>
            <Heading level={2}>Not sent yet</Heading>
            <Text testID="sign-out-unsent">
              {changes(unsent ?? 0)} you made on this device {unsent === 1 ? 'has' : 'have'} not reached the server yet.
            </Text>
            <Text>
              {unsent === 1 ? 'It stays' : 'They stay'} on this device, kept for you: nobody else who signs in here can see, send or
              give {unsent === 1 ? 'it' : 'them'} up. {unsent === 1 ? 'It goes' : 'They go'} to the server the next time you sign in
              here and sync.
            </Text>
            {sendError ? (
              <Banner kind="error" testID="sign-out-send-error">
                {`Not all sent: ${sendError}`}
              </Banner>
            ) : null}
            <View style={styles.actions}>
              {teamId ? (
                <Button
                  label={unsent === 1 ? 'Send it, then sign out' : 'Send them, then sign out'}
                  testID="sign-out-send-first"
                  loading={sending}
                  onPress={() => void sendFirst()}
                  block
                />
              ) : null}
              <Button
                label="Sign out now, keep them here"
                variant="secondary"
                testID="sign-out-confirm"
                disabled={sending}
                onPress={confirm}
                block
              />
              <Button label="Stay signed in" variant="quiet" testID="sign-out-cancel" disabled={sending} onPress={close} block />
            </View>
          </Card>
        </View>
      </Modal>
    </>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, alignItems: 'center', justifyContent: 'center', padding: spacing.md, backgroundColor: 'rgba(11, 29, 42, 0.45)' },
  card: { maxWidth: 480, width: '100%', gap: spacing.sm },
  actions: { gap: spacing.xs, marginTop: spacing.xs },
});
