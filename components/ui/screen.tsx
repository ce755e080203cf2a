/**
 * Screen: the frame of every page. Keeps content inside the safe area (notches, home bar), scrolls
 * when the keyboard or a small phone needs it, and caps the content width so a laptop shows a
 * readable column or a designed multi-pane layout instead of a stretched phone.
 *
 * A screen is the page's main landmark, unless a frame around it (the coach's sections) already
 * is one: a page has exactly one, so screen readers can jump straight to the content.
 */
import { createContext, useContext, type ReactNode } from 'react';
import { ScrollView, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import { SafeAreaView, type Edge } from 'react-native-safe-area-context';

import { colors, layout, spacing } from './theme';
import { useBreakpoint } from './use-breakpoint';

export type ScreenProps = {
  children: ReactNode;
  /** 'form' for sign-in style pages, 'content' for app pages, 'full' for the wide multi-pane layout. */
  width?: 'form' | 'content' | 'full';
  scroll?: boolean;
  /** Center the column vertically (auth pages on tall screens). */
  centered?: boolean;
  testID?: string;
  edges?: Edge[];
  contentStyle?: StyleProp<ViewStyle>;
};

/** Set by a frame that is itself the main landmark; screens inside it then add none. */
export const InsideMain = createContext(false);

const maxWidths = { form: layout.formMaxWidth, content: layout.contentMaxWidth, full: undefined } as const;

export function Screen({
  children,
  width = 'content',
  scroll = true,
  centered = false,
  testID,
  edges = ['top', 'bottom', 'left', 'right'],
  contentStyle,
}: ScreenProps) {
  const wide = useBreakpoint() === 'wide';
  const inMain = useContext(InsideMain);
  const column = (
    <View style={[styles.column, !centered && styles.grow, { maxWidth: maxWidths[width] }, contentStyle]}>{children}</View>
  );
  return (
    <SafeAreaView style={styles.safe} edges={edges} testID={testID} role={inMain ? undefined : 'main'}>
      {scroll ? (
        <ScrollView
          style={styles.fill}
          contentContainerStyle={[styles.scrollContent, wide && styles.wideContent, centered && styles.centered]}
          keyboardShouldPersistTaps="handled"
        >
          {column}
        </ScrollView>
      ) : (
        <View style={[styles.fill, styles.scrollContent, wide && styles.wideContent, centered && styles.centered]}>{column}</View>
      )}
    </SafeAreaView>
  );
}

const styles = StyleSheet.create({
  safe: { flex: 1, backgroundColor: colors.background },
  fill: { flex: 1 },
  scrollContent: { flexGrow: 1, alignItems: 'center', padding: spacing.md },
  wideContent: { padding: spacing.xl },
  centered: { justifyContent: 'center' },
  column: { width: '100%', gap: spacing.lg },
  // Without centring the column fills the height, so a pane can stretch to the bottom.
  grow: { flexGrow: 1 },
});
