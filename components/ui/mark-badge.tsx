/**
 * MarkBadge: shows an observation mark ("needs work" / "good") as shape + word + colour pair,
 * never colour alone. The shape is drawn (SVG) so it looks the same on every platform and font.
 */
import { memo } from 'react';
import { StyleSheet, View } from 'react-native';
import Svg, { Circle, Path, Polygon } from 'react-native-svg';

import { Text } from './text';
import { marks, radius, spacing, type MarkKind } from './theme';

// Memoised: drawn in every chip, feed item and the undo bar, and its props are two primitives.
export const MarkShape = memo(function MarkShape({ kind, size = 20 }: { kind: MarkKind; size?: number }) {
  const mark = marks[kind];
  return (
    <Svg width={size} height={size} viewBox="0 0 20 20" accessibilityElementsHidden importantForAccessibility="no">
      {mark.shape === 'triangle' ? (
        <Polygon points="10,1.5 19,18 1,18" fill={mark.strong} />
      ) : (
        <>
          <Circle cx="10" cy="10" r="9" fill={mark.strong} />
          <Path d="M5.5 10.5 L8.8 13.6 L14.6 6.8" stroke="#FFFFFF" strokeWidth="2.4" fill="none" strokeLinecap="round" />
        </>
      )}
    </Svg>
  );
});

export const MarkBadge = memo(function MarkBadge({ kind, testID }: { kind: MarkKind; testID?: string }) {
  const mark = marks[kind];
  return (
    <View
      testID={testID}
      accessibilityLabel={mark.word}
      style={[styles.badge, { backgroundColor: mark.surface, borderColor: mark.strong }]}
    >
      <MarkShape kind={kind} />
      <Text weight="bold" style={{ color: mark.ink }}>
        {mark.word}
      </Text>
    </View>
  );
});

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
    alignSelf: 'flex-start',
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xxs,
    borderRadius: radius.pill,
    borderWidth: 2,
  },
});
