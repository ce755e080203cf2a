/**
 * AuthFrame: the shared page for sign-in, sign-up, invitations and password reset. On a phone it
 * is one centred column; on a wide screen the brand and a short word on what Boardside does sit
 * in their own pane beside the form, instead of a lone phone-sized card in a sea of background.
 */
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { Card, Heading, MarkBadge, Screen, Text, colors, layout, radius, spacing, useBreakpoint } from '../ui';

export type AuthFrameProps = {
  title: string;
  intro?: string;
  children: ReactNode;
  testID: string;
};

function Wordmark({ inverse = false }: { inverse?: boolean }) {
  return (
    <View style={styles.wordmark} accessibilityRole="header" aria-level={1} accessibilityLabel="Boardside">
      <View style={[styles.logo, inverse && styles.logoInverse]} accessibilityElementsHidden>
        <View style={[styles.logoLine, inverse && styles.logoLineInverse]} />
      </View>
      <Text variant="title" weight="bold" tone={inverse ? 'inverse' : 'primary'}>
        Boardside
      </Text>
    </View>
  );
}

export function AuthFrame({ title, intro, children, testID }: AuthFrameProps) {
  const breakpoint = useBreakpoint();
  const form = (
    <Card style={styles.card}>
      <Heading level={breakpoint === 'wide' ? 1 : 2}>{title}</Heading>
      {intro ? <Text tone="muted">{intro}</Text> : null}
      {children}
    </Card>
  );

  if (breakpoint === 'wide') {
    return (
      <Screen width="content" centered testID={testID}>
        <View style={styles.wideRow}>
          <View style={styles.brandPane}>
            <Wordmark inverse />
            <Text variant="display" weight="bold" tone="inverse">
              Your notebook at the boards.
            </Text>
            <Text variant="bodyLarge" tone="inverse">
              Tap a skater, tap a cue, time the pair. It all keeps working without a network and syncs
              when you are back.
            </Text>
            <View style={styles.marks}>
              <MarkBadge kind="needsWork" />
              <MarkBadge kind="good" />
            </View>
          </View>
          <View style={styles.formPane}>{form}</View>
        </View>
      </Screen>
    );
  }

  return (
    <Screen width="form" centered testID={testID}>
      <Wordmark />
      {form}
    </Screen>
  );
}

const styles = StyleSheet.create({
  wordmark: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  logo: {
    width: 36,
    height: 36,
    borderRadius: radius.sm,
    backgroundColor: colors.primary,
    justifyContent: 'flex-end',
    padding: 6,
  },
  logoInverse: { backgroundColor: colors.surface },
  // The logo: a rink board seen side-on, a bar along the bottom edge of a square.
  logoLine: { height: 6, borderRadius: 3, backgroundColor: colors.surface },
  logoLineInverse: { backgroundColor: colors.primary },
  card: { alignSelf: 'stretch' },
  wideRow: { flexDirection: 'row', gap: spacing.xl, alignItems: 'stretch', width: '100%', maxWidth: layout.contentMaxWidth },
  brandPane: {
    flex: 1,
    backgroundColor: colors.primary,
    borderRadius: radius.lg,
    padding: spacing.xl,
    gap: spacing.lg,
    justifyContent: 'center',
  },
  marks: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
  formPane: { width: layout.formMaxWidth + spacing.xl, justifyContent: 'center' },
});
