/**
 * The running clock: elapsed time since the gun, the largest figures on the screen. It re-renders
 * on its own (one animation frame at a time, only when the shown hundredth changes), so the lanes
 * and the rest of the screen do not repaint with it. Shown truncated like every race time.
 *
 * Screen readers are not fed a number changing 100 times a second: the clock is a timer whose
 * text they read when asked.
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { formatRaceTime } from '../../shared/timing';
import { Text, colors, fonts, spacing } from '../ui';
import { elapsedMs } from './clock-math';

export function ElapsedClock({
  startPerfTs,
  offsetMs,
  running,
  finalMs,
  fontSize,
  approximate,
}: {
  startPerfTs: number;
  offsetMs: number;
  running: boolean;
  /** Shown when the heat is not running (the last crossing). */
  finalMs?: number;
  fontSize: number;
  /** After a reload the clock is rebuilt from the device's wall clock: marked with "≈". */
  approximate?: boolean;
}) {
  const [text, setText] = useState(() => formatRaceTime(running ? elapsedMs(performance.now(), startPerfTs, offsetMs) : finalMs ?? 0));

  useEffect(() => {
    if (!running) {
      setText(formatRaceTime(finalMs ?? 0));
      return;
    }
    let frame = 0;
    let shown = '';
    const tick = () => {
      const next = formatRaceTime(elapsedMs(performance.now(), startPerfTs, offsetMs));
      if (next !== shown) {
        shown = next;
        setText(next);
      }
      frame = requestAnimationFrame(tick);
    };
    tick();
    return () => cancelAnimationFrame(frame);
  }, [running, startPerfTs, offsetMs, finalMs]);

  return (
    <View
      style={styles.wrap}
      role="timer"
      aria-label="Elapsed time"
      testID="clock-elapsed"
      // Where the clock stands on this page's performance clock: tests dispatch taps against it.
      {...({ dataSet: { anchor: String(startPerfTs), offset: String(offsetMs) } } as object)}
    >
      {approximate ? (
        <Text style={[styles.approx, { fontSize: Math.round(fontSize * 0.5), lineHeight: Math.round(fontSize * 0.9) }]} aria-hidden>
          {'\u2248'}
        </Text>
      ) : null}
      <Text
        numeric
        testID="clock-elapsed-text"
        style={[styles.figures, { fontSize, lineHeight: Math.round(fontSize * 1.05) }]}
      >
        {text}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flexDirection: 'row', alignItems: 'baseline', gap: spacing.xxs, flexShrink: 1 },
  figures: { fontFamily: fonts.numbers, color: colors.ink, fontVariant: ['tabular-nums'] },
  approx: { fontFamily: fonts.numbers, color: colors.inkMuted },
});
