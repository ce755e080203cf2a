/**
 * A surface that fires on touch-DOWN with the pointer event's own timestamp (event.timeStamp, the
 * clock performance.now() reads), not on release and not "when JavaScript got round to it": a
 * crossing is the moment the glove hits the glass. Used for the start button and the lane buttons.
 *
 * Keyboard: Enter or Space fires with the key event's timestamp (a held key does not repeat).
 * What the surface shows is drawn on top by the caller with pointerEvents="none", so the button's
 * accessible name stays the short label and taps anywhere on the drawing land here.
 */
import { useState, type ReactNode } from 'react';
import { StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';

import { colors } from '../ui';

type StampedEvent = { timeStamp?: number; nativeEvent?: { timeStamp?: number; timestamp?: number }; button?: number };
type KeyEvent = StampedEvent & { key?: string; repeat?: boolean; nativeEvent?: { key?: string; repeat?: boolean; timeStamp?: number }; preventDefault?: () => void };

/** The event's own time on the performance clock. */
export function eventTime(event: StampedEvent): number {
  const t = event.nativeEvent?.timeStamp ?? event.nativeEvent?.timestamp ?? event.timeStamp;
  return typeof t === 'number' && Number.isFinite(t) && t > 0 ? t : performance.now();
}

export type TapSurfaceProps = {
  label: string;
  hint?: string;
  onTap: (timeStamp: number) => void;
  disabled?: boolean;
  testID: string;
  style?: StyleProp<ViewStyle>;
  children?: ReactNode;
};

export function TapSurface({ label, hint, onTap, disabled = false, testID, style, children }: TapSurfaceProps) {
  const [focused, setFocused] = useState(false);
  const fire = (event: StampedEvent) => {
    if (disabled) return;
    // Only the primary button of a mouse (a touch or pen reports 0 too).
    if (typeof event.button === 'number' && event.button > 0) return;
    onTap(eventTime(event));
  };
  const onKeyDown = (event: KeyEvent) => {
    const key = event.key ?? event.nativeEvent?.key;
    if (key !== 'Enter' && key !== ' ') return;
    event.preventDefault?.();
    if (event.repeat ?? event.nativeEvent?.repeat) return;
    fire(event);
  };
  return (
    <View
      testID={testID}
      role="button"
      aria-label={label}
      accessibilityHint={hint}
      aria-disabled={disabled}
      tabIndex={disabled ? -1 : 0}
      onPointerDown={fire as never}
      // @ts-expect-error react-native-web forwards key events to the element
      onKeyDown={onKeyDown}
      onFocus={() => setFocused(true)}
      onBlur={() => setFocused(false)}
      style={[styles.surface, style, focused && styles.focused]}
    >
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  // No text selection, no double-tap zoom, no callout: the surface is hit fast and often.
  surface: { userSelect: 'none', touchAction: 'manipulation', cursor: 'pointer' } as ViewStyle,
  focused: { outlineColor: colors.focus, outlineWidth: 4, outlineStyle: 'solid', outlineOffset: -4 } as ViewStyle,
});
