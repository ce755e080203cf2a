/**
 * The coach's frame around the four sections (Board, Clock, Evening, Squad).
 *
 * Phone: a slim top bar (team, sign out) and a bottom bar of big labelled buttons, reachable with
 * a thumb at the boards. Wide (>= 1024 px): a left rail with the team, the sections and sign-out,
 * and the section's own content beside it — a laptop layout, not a stretched phone.
 *
 * Built on expo-router's headless tabs so the same triggers drive both layouts. For screen readers
 * the sections are a navigation landmark of links (the current one marked as the page), the
 * phone's top bar is the banner, the section itself the one main landmark, and the sync details
 * a modal dialog.
 *
 * The team name is never cut short on a phone: it wraps to a second line ("Kettlemere Speed
 * Club" does not fit one line beside the sync line and sign-out at 390 px).
 */
import { TabList, TabSlot, TabTrigger, Tabs, type TabTriggerSlotProps } from 'expo-router/ui';
import { useQueryClient } from '@tanstack/react-query';
import { forwardRef, useCallback, useState } from 'react';
import { Pressable, StyleSheet, View, type View as ViewType } from 'react-native';
import { SafeAreaView } from 'react-native-safe-area-context';

import { roleLabels } from '../../shared/schemas';
import { boardKeys } from '../../store/board';
import { useSyncTriggers } from '../../store/sync-status';
import { SignOutButton } from '../auth/sign-out-button';
import { SyncPanel, SyncSummary } from '../sync/sync-control';
import { useActiveMembership, useSession } from '../../store/session';
import { InsideMain, Text, colors, layout, radius, spacing, tapTarget, useBreakpoint } from '../ui';
import { SectionIcon, type CoachSection } from './tab-icons';

const sections: { name: CoachSection; href: '/board' | '/clock' | '/review' | '/squad'; label: string }[] = [
  { name: 'board', href: '/board', label: 'Board' },
  { name: 'clock', href: '/clock', label: 'Clock' },
  { name: 'review', href: '/review', label: 'Evening' },
  { name: 'squad', href: '/squad', label: 'Squad' },
];

type SectionButtonProps = TabTriggerSlotProps & { section: CoachSection; label: string; wide: boolean };

const SectionButton = forwardRef<ViewType, SectionButtonProps>(function SectionButton(
  { section, label, wide, isFocused, ...pressable },
  ref,
) {
  const ink = isFocused ? (wide ? colors.onPrimary : colors.primary) : colors.inkMuted;
  return (
    <Pressable
      ref={ref}
      {...pressable}
      testID={`tab-${section}`}
      role="link"
      aria-current={isFocused ? 'page' : undefined}
      style={[
        wide ? styles.railButton : styles.barButton,
        isFocused && (wide ? styles.railButtonActive : styles.barButtonActive),
      ]}
    >
      <SectionIcon section={section} color={ink} />
      <Text weight={isFocused ? 'bold' : 'regular'} variant={wide ? 'bodyLarge' : 'caption'} style={{ color: ink }}>
        {label}
      </Text>
    </Pressable>
  );
});

export function CoachShell() {
  const wide = useBreakpoint() === 'wide';
  const membership = useActiveMembership();
  const user = useSession((s) => s.user);
  const teamName = membership?.teamName ?? '';
  const roleLabel = membership ? roleLabels[membership.role] : '';
  const [syncOpen, setSyncOpen] = useState(false);
  const client = useQueryClient();
  const refetchDevice = useCallback(() => void client.invalidateQueries({ queryKey: boardKeys.all }), [client]);
  // Sync runs on its own (open, reconnect, focus, quiet period after taps); the panel runs it by hand.
  useSyncTriggers(membership?.teamId, refetchDevice);

  return (
    <SafeAreaView style={styles.safe} edges={['top', 'bottom', 'left', 'right']}>
      {/* Phone: column-reverse puts the section bar (first in reading order) at the bottom. */}
      <Tabs style={wide ? styles.wideRoot : styles.phoneRoot}>
        <TabList style={wide ? styles.rail : styles.bar} role="navigation" aria-label="Sections">
          {wide ? (
            <View style={styles.railHeader}>
              <Text variant="title" weight="bold" tone="primary">
                Boardside
              </Text>
              <Text weight="bold" testID="team-name">
                {teamName}
              </Text>
              <Text tone="muted" variant="caption">
                {user?.displayName} · {roleLabel}
              </Text>
            </View>
          ) : null}
          {sections.map((s) => (
            <TabTrigger key={s.name} name={s.name} href={s.href} asChild>
              <SectionButton section={s.name} label={s.label} wide={wide} />
            </TabTrigger>
          ))}
          {wide ? (
            <View style={styles.railFooter}>
              <SyncSummary onOpen={() => setSyncOpen(true)} />
              <SignOutButton />
            </View>
          ) : null}
        </TabList>
        <View style={styles.slot} role="main">
          <InsideMain.Provider value>
            <TabSlot style={styles.slot} />
          </InsideMain.Provider>
        </View>
        {wide ? null : (
          <View style={styles.topBar} role="banner">
            <View style={styles.topBarText}>
              <Text weight="bold" numberOfLines={2} testID="team-name" style={styles.topBarTeam}>
                {teamName}
              </Text>
            </View>
            <SyncSummary onOpen={() => setSyncOpen(true)} />
            <SignOutButton />
          </View>
        )}
      </Tabs>
      {syncOpen ? (
        <View style={styles.overlay} role="dialog" aria-modal aria-label="Sync details">
          {/* A tap beside the panel closes it; keyboards and screen readers use its Close button. */}
          <Pressable style={styles.backdrop} onPress={() => setSyncOpen(false)} focusable={false} aria-hidden />
          <SyncPanel onClose={() => setSyncOpen(false)} />
        </View>
      ) : null}
    </SafeAreaView>
  );
}

const styles = StyleSheet.create({
  safe: { flex: 1, backgroundColor: colors.background },
  phoneRoot: { flex: 1, flexDirection: 'column-reverse' },
  wideRoot: { flex: 1, flexDirection: 'row' },
  slot: { flex: 1 },
  bar: {
    flexDirection: 'row',
    borderTopWidth: 1,
    borderTopColor: colors.divider,
    backgroundColor: colors.surface,
    paddingHorizontal: spacing.xxs,
  },
  barButton: {
    flex: 1,
    minHeight: tapTarget + 16,
    alignItems: 'center',
    justifyContent: 'center',
    gap: 2,
    borderTopWidth: 4,
    borderTopColor: 'transparent',
  },
  // Selected: a bold label and a top bar line, not colour alone.
  barButtonActive: { borderTopColor: colors.primary },
  topBar: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingLeft: spacing.md,
    paddingRight: spacing.xs,
    minHeight: tapTarget + 8,
    backgroundColor: colors.surface,
    borderBottomWidth: 1,
    borderBottomColor: colors.divider,
  },
  topBarText: { flex: 1, paddingVertical: spacing.xxs },
  // Two lines of a long team name fit the bar's height beside the sync line and sign-out.
  topBarTeam: { fontSize: 17, lineHeight: 21 },
  rail: {
    width: layout.railWidth,
    flexDirection: 'column',
    backgroundColor: colors.surfaceSunken,
    padding: spacing.md,
    gap: spacing.xs,
  },
  railHeader: { gap: spacing.xxs, paddingBottom: spacing.lg, paddingHorizontal: spacing.xs },
  railButton: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    minHeight: tapTarget + 8,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
  },
  railButtonActive: { backgroundColor: colors.primary },
  railFooter: { marginTop: 'auto', alignItems: 'flex-start', gap: spacing.xs },
  overlay: { position: 'absolute', top: 0, left: 0, right: 0, bottom: 0, alignItems: 'center', justifyContent: 'center', padding: spacing.md },
  backdrop: { position: 'absolute', top: 0, left: 0, right: 0, bottom: 0, backgroundColor: 'rgba(11, 29, 42, 0.45)' },
});
