/**
 * PasswordField: a TextField with a Show/Hide toggle. Typing a password with cold fingers on a
 * phone goes wrong often; letting people see what they typed saves a round trip to the server.
 */
import { forwardRef, useState } from 'react';
import { StyleSheet, View, type TextInput } from 'react-native';

import { Button, TextField, spacing, type TextFieldProps } from '../ui';

export const PasswordField = forwardRef<TextInput, TextFieldProps>(function PasswordField(props, ref) {
  const [visible, setVisible] = useState(false);
  return (
    <View style={styles.wrap}>
      <TextField
        ref={ref}
        secureTextEntry={!visible}
        autoCapitalize="none"
        autoCorrect={false}
        {...props}
      />
      <Button
        variant="quiet"
        label={visible ? 'Hide password' : 'Show password'}
        onPress={() => setVisible((v) => !v)}
        testID={`${props.testID}-toggle`}
        style={styles.toggle}
      />
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: spacing.xxs },
  // Right-aligned under the field, clear of the label column and of the submit button's path.
  toggle: { alignSelf: 'flex-end' },
});
