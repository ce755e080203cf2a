/**
 * "Read aloud": speaks the day's cues in the page's order through the speech wrapper, with a stop
 * control while it speaks. Stops on its own when the day changes or the page closes, and says so
 * plainly when the device cannot speak.
 */
import { useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { speak, stop, type SpeechOutcome } from '../../store/speech';
import { Button, Text, spacing } from '../ui';

export function ReadAloud({ lines, resetKey }: { lines: readonly string[]; resetKey: string }) {
  const [speaking, setSpeaking] = useState(false);
  const [failed, setFailed] = useState(false);
  const run = useRef(0);

  const halt = () => {
    run.current += 1;
    stop();
    setSpeaking(false);
  };

  // A new day (or leaving the page) ends what was being read.
  useEffect(() => {
    return () => {
      if (run.current > 0) stop();
      run.current += 1;
      setSpeaking(false);
      setFailed(false);
    };
  }, [resetKey]);

  const start = () => {
    if (lines.length === 0) return;
    const mine = ++run.current;
    setSpeaking(true);
    setFailed(false);
    const ended = (outcome: SpeechOutcome, last: boolean) => {
      if (run.current !== mine) return;
      if (outcome === 'failed') {
        run.current += 1;
        stop();
        setSpeaking(false);
        setFailed(true);
      } else if (last) {
        setSpeaking(false);
      }
    };
    lines.forEach((line, index) => {
      speak(line, { onEnd: (outcome) => ended(outcome, index === lines.length - 1) });
    });
  };

  return (
    <View style={styles.wrap}>
      {speaking ? (
        <Button label={'\u25A0 Stop reading'} variant="primary" testID="read-stop" onPress={halt} accessibilityLabel="Stop reading aloud" />
      ) : (
        <Button
          label={'\u25B6 Read aloud'}
          variant="primary"
          testID="read-aloud"
          disabled={lines.length === 0}
          onPress={start}
          accessibilityHint="Reads the day’s cues aloud, phase by phase"
        />
      )}
      {failed ? (
        <Text variant="caption" tone="error" testID="read-aloud-failed">
          This device could not read aloud. Check its sound and voices, or read the cues below.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: spacing.xxs, alignItems: 'flex-start', flexShrink: 1 } });
