/**
 * Banner: a message about the whole screen (a server error with no field to attach to, a
 * confirmation). Errors are announced to screen readers as alerts; the leading glyph means the
 * kind is not told by colour alone.
 */
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { Text } from './text';
import { colors, radius, spacing } from './theme';

export type BannerKind = 'error' | 'info' | 'success';

const look: Record<BannerKind, { ink: string; surface: string; glyph: string; label: string }> = {
  error: { ink: colors.error, surface: colors.errorSurface, glyph: '!', label: 'Error' },
  info: { ink: colors.info, surface: colors.infoSurface, glyph: 'i', label: 'Note' },
  success: { ink: colors.success, surface: colors.successSurface, glyph: '\u2713', label: 'Done' },
};

export type BannerProps = {
  kind?: BannerKind;
  title?: string;
  children: ReactNode;
  testID?: string;
};

export function Banner({ kind = 'info', title, children, testID }: BannerProps) {
  const { ink, surface, glyph, label } = look[kind];
  return (
    <View
      testID={testID}
      // A status (polite live region), not an unnamed region landmark.
      role={kind === 'error' ? 'alert' : 'status'}
      aria-live={kind === 'error' ? 'assertive' : 'polite'}
      style={[styles.banner, { backgroundColor: surface, borderColor: ink }]}
    >
      <View style={[styles.glyph, { borderColor: ink }]} accessibilityLabel={label}>
        <Text weight="bold" style={{ color: ink }} align="center">
          {glyph}
        </Text>
      </View>
      <View style={styles.body}>
        {title ? (
          <Text weight="bold" style={{ color: ink }}>
            {title}
          </Text>
        ) : null}
        {typeof children === 'string' ? <Text style={{ color: ink }}>{children}</Text> : children}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  banner: {
    flexDirection: 'row',
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radius.md,
    borderWidth: 2,
    alignItems: 'flex-start',
  },
  glyph: {
    width: 28,
    height: 28,
    borderRadius: 14,
    borderWidth: 2,
    alignItems: 'center',
    justifyContent: 'center',
  },
  body: { flex: 1, gap: spacing.xxs },
});
