/**
 * "Sign out", for the coach area and the skater's page. On a shared device (a club tablet, a family
 * phone) the next person must not see what this person could read, and this person must not lose
 * what they recorded: signing out empties the device of their rows and keeps their unsent changes,
 * parked for them. When there are such changes, a short dialog says so plainly before leaving.
 */
import { useState } from 'react';
import { Modal, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';

import { useSignOut } from '../../store/auth';
import { unsentOnDevice } from '../../store/device-owner';
import { Button, Card, Heading, Text, spacing } from '../ui';

const changes = (n: number) => (n === 1 ? '1 change' : `${n} changes`);

export function SignOutButton({ style }: { style?: StyleProp<ViewStyle> }) {
  const signOut = useSignOut();
  const [checking, setChecking] = useState(false);
  /** Unsent changes found when "Sign out" was pressed; the dialog is open while this is set. */
  const [unsent, setUnsent] = useState<number | null>(null);

  const press = async () => {
    setChecking(true);
    const waiting = await unsentOnDevice();
    setChecking(false);
    if (waiting > 0) setUnsent(waiting);
    else signOut.mutate();
  };
  const confirm = () => {
    setUnsent(null);
    signOut.mutate();
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
      <Modal visible={unsent !== null} transparent animationType="none" onRequestClose={() => setUnsent(null)}>
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
            <View style={styles.actions}>
              <Button label="Sign out" testID="sign-out-confirm" onPress={confirm} block />
              <Button label="Stay signed in" variant="secondary" testID="sign-out-cancel" onPress={() => setUnsent(null)} block />
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
