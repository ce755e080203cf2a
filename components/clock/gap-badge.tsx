/**
 * The gap to a skater's schedule: the signed figure in hundredths AND a word ("behind", "ahead",
 * "on schedule"), on a tint from two hue families that stay apart for colour-blind eyes (orange
 * behind, blue ahead), with a different edge (dashed behind, solid ahead). Never colour alone.
 */
import { StyleSheet, View } from 'react-native';

import { Text, colors, fonts, marks, radius, spacing } from '../ui';
import type { GapView } from './clock-math';

const look = {
  behind: { ink: marks.needsWork.ink, surface: marks.needsWork.surface, edge: 'dashed' as const },
  ahead: { ink: marks.good.ink, surface: marks.good.surface, edge: 'solid' as const },
  level: { ink: colors.ink, surface: colors.surfaceSunken, edge: 'solid' as const },
};

export function GapBadge({ gap, size = 'md', testID }: { gap: GapView; size?: 'sm' | 'md' | 'lg'; testID?: string }) {
  const l = look[gap.side];
  const fontSize = size === 'lg' ? 40 : size === 'md' ? 30 : 20;
  return (
    <View
      testID={testID}
      style={[styles.badge, { backgroundColor: l.surface, borderColor: l.ink, borderStyle: l.edge }]}
      aria-label={`${gap.text.replace('\u2212', 'minus ')} ${gap.word}`}
      role="group"
    >
      <Text style={[styles.figure, { color: l.ink, fontSize, lineHeight: Math.round(fontSize * 1.1) }]} testID={testID ? `${testID}-text` : undefined}>
        {gap.text}
      </Text>
      <Text weight="bold" variant={size === 'sm' ? 'caption' : 'body'} style={{ color: l.ink }}>
        {gap.word}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'baseline',
    flexWrap: 'wrap',
    columnGap: spacing.xs,
    paddingHorizontal: spacing.xs,
    paddingVertical: 2,
    borderRadius: radius.sm,
    borderWidth: 2,
    alignSelf: 'flex-start',
  },
  figure: { fontFamily: fonts.numbers },
});
