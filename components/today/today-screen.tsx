/**
 * The skater's (or guardian's) "today": the day's cues from every coach, grouped by phase, each
 * with its mark, the coach's shared note and "Got it"; read aloud on request; earlier days one
 * tap away; a sync line with "Refresh". Everything is read from the device, so it works at the
 * rink without a network. On a phone one column; from 1024 px the days sit in a side pane and the
 * cues beside them. A link opens "my weeks" (components/my-weeks/): every week at once.
 */
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { targetsQuery, useSkaterRuns, type Target } from '../../store/clock';
import { useConnectivity } from '../../store/connectivity';
import { useActiveMembership, useSession } from '../../store/session';
import { runSync } from '../../store/sync-status';
import { refreshToday, todayOnDevice, useAcknowledge, useSkaterDays, useSkaterName, useSkaterNotes } from '../../store/today';
import { Banner, Button, Heading, Screen, Text, TextLink, colors, layout, radius, spacing, useBreakpoint } from '../ui';
import { SignOutButton } from '../auth/sign-out-button';
import { DayHeader, RecentDays } from './day-chooser';
import { groupByPhase, longDay, offeredDays, plural, shortDay, spokenScript } from './format';
import { NoteCard } from './note-card';
import { ReadAloud } from './read-aloud';
import { RunList } from './run-list';
import { SafetyNote } from './safety-note';
import { SyncLine } from './sync-line';

const firstName = (name: string | null | undefined) => (name ?? '').trim().split(/\s+/)[0] ?? '';
const possessive = (name: string) => (name.endsWith('s') ? `${name}’` : `${name}’s`);

export function TodayScreen() {
  const wide = useBreakpoint() === 'wide';
  const client = useQueryClient();
  const user = useSession((s) => s.user);
  const signedInOffline = useSession((s) => s.offline);
  const serverOnline = useConnectivity((s) => s.online);
  const offline = signedInOffline || !serverOnline;
  const membership = useActiveMembership();

  const teamId = membership?.teamId ?? '';
  const skaterId = membership?.skaterId ?? '';
  const guardian = membership?.role === 'guardian';

  const [today] = useState(todayOnDevice);
  const [selected, setSelected] = useState(today);

  const skaterName = useSkaterName(teamId, skaterId);
  const days = useSkaterDays(teamId, skaterId);
  const notes = useSkaterNotes(teamId, skaterId, selected);
  const acknowledge = useAcknowledge();
  // The day's timed runs, shown beside the cues (the skater's own, pulled with the rest).
  const runs = useSkaterRuns(teamId, skaterId, selected);
  // Keyed under the today page's prefix, so its refresh after a sync re-reads the targets too.
  const targetsRead = targetsQuery(teamId).queryFn as () => Promise<Target[]>;
  const targets = useQuery({
    queryKey: ['device', 'today', teamId, skaterId, 'targets'],
    queryFn: () => targetsRead(),
    networkMode: 'always',
    staleTime: Infinity,
    retry: false,
    enabled: !!teamId && !!skaterId,
  });

  const groups = useMemo(() => groupByPhase(notes.data ?? []), [notes.data]);
  const offered = useMemo(() => offeredDays(days.data ?? [], today, selected), [days.data, today, selected]);
  const dayLabel = selected === today ? 'Today' : longDay(selected, today);
  const script = useMemo(() => spokenScript(groups, dayLabel), [groups, dayLabel]);
  const total = notes.data?.length ?? 0;
  const open = (notes.data ?? []).filter((n) => !n.acknowledgedAt).length;
  const lastDayWithCues = (days.data ?? []).find((d) => d.day !== selected && d.count > 0) ?? null;

  const skaterFirst = firstName(skaterName) || (guardian ? 'Your skater' : firstName(user?.displayName));
  const heading = guardian ? `${possessive(skaterFirst)} cues` : skaterFirst ? `Hi ${skaterFirst}` : 'Hi';
  const refresh = () => void runSync(teamId, () => void refreshToday(client));
  const onAcknowledge = (id: string) => acknowledge.mutate({ teamId, skaterId, day: selected, id });

  const greeting = (
    <View style={styles.greeting}>
      <Heading testID="today-heading">{heading}</Heading>
      {guardian ? (
        <Text variant="bodyLarge" testID="guardian-note">
          You are viewing as {possessive(skaterFirst)} guardian (read only)
          {membership?.teamName ? <Text variant="bodyLarge" tone="muted">{` · ${membership.teamName}`}</Text> : null}
        </Text>
      ) : (
        <Text variant="bodyLarge" testID="skater-team">
          Skating with{' '}
          <Text variant="bodyLarge" weight="bold">
            {membership?.teamName ?? ''}
          </Text>
        </Text>
      )}
      {/* Every week at once (counted on the server): cues by ISO week, shared notes, runs. */}
      <TextLink
        href="/weeks"
        label={guardian ? `${possessive(skaterFirst)} weeks: cues and runs week by week` : 'My weeks: cues and runs week by week'}
        testID="today-my-weeks"
      />
    </View>
  );

  const syncLine = <SyncLine offline={offline} onRefresh={refresh} />;

  const chooserProps = { offered, selected, today, onSelect: setSelected };

  const dayBody = !skaterId ? (
    <Banner kind="info" testID="today-no-skater">
      This account is not linked to a skater profile yet. Ask your head coach to link it.
    </Banner>
  ) : notes.isPending ? (
    <Text tone="muted" testID="today-loading">
      Opening your cues…
    </Text>
  ) : notes.error ? (
    <Banner kind="error" testID="today-error">
      {`Your cues could not be read on this device: ${notes.error.message}`}
    </Banner>
  ) : total === 0 ? (
    <View style={styles.empty} testID="today-empty">
      <Text variant="title" weight="bold">
        {selected === today ? 'No cues from your coaches today' : `No cues from your coaches on ${longDay(selected, today)}`}
      </Text>
      {lastDayWithCues ? (
        <>
          <Text testID="today-last-day">
            {`The last cues came ${shortDay(lastDayWithCues.day, today) === 'Yesterday' ? 'yesterday' : `on ${longDay(lastDayWithCues.day, today)}`}: ${plural(lastDayWithCues.count, 'cue', 'cues')}.`}
          </Text>
          <Button
            label={`Show ${shortDay(lastDayWithCues.day, today)}`}
            variant="secondary"
            testID="today-show-last"
            onPress={() => setSelected(lastDayWithCues.day)}
            style={styles.start}
          />
        </>
      ) : (
        <Text tone="muted">{offline ? 'When you are back online, Refresh fetches new cues.' : 'Cues appear here after your coaches note them.'}</Text>
      )}
    </View>
  ) : (
    <View style={styles.groups}>
      <View style={styles.summaryRow}>
        <Text variant="bodyLarge" weight="bold" testID="today-summary" style={styles.grow}>
          {open === 0
            ? `${plural(total, 'cue', 'cues')}, all acknowledged`
            : `${plural(total, 'cue', 'cues')}, ${open} ${guardian ? 'not yet read by the skater' : 'to acknowledge'}`}
        </Text>
        <ReadAloud lines={script} resetKey={selected} />
      </View>
      {acknowledge.error ? (
        <Banner kind="error" testID="today-ack-error">
          {`That could not be saved: ${acknowledge.error.message}`}
        </Banner>
      ) : null}
      {groups.map((group) => (
        <View key={group.key} style={styles.group} testID={`phase-${group.key}`}>
          <Heading level={3} testID={`phase-title-${group.key}`} style={styles.phaseTitle}>
            {`${group.label} (${group.notes.length})`}
          </Heading>
          <View style={wide ? styles.cardsWide : styles.cards} role="list" aria-label={group.label}>
            {group.notes.map((note) => (
              <View key={note.id} style={wide ? styles.cardWide : undefined} role="listitem">
                <NoteCard note={note} onAcknowledge={onAcknowledge} guardian={guardian} />
              </View>
            ))}
          </View>
        </View>
      ))}
    </View>
  );

  const runList = skaterId ? <RunList runs={runs.data ?? []} targets={targets.data} /> : null;
  const hasRuns = (runs.data?.length ?? 0) > 0;

  const signOutButton = (
    <SignOutButton style={styles.start} />
  );

  if (wide) {
    return (
      <Screen testID="skater-home">
        <View style={styles.wideRow}>
          <View style={styles.side} testID="today-side">
            {greeting}
            {syncLine}
            <RecentDays {...chooserProps} wide />
            <SafetyNote />
            {signOutButton}
          </View>
          <View style={styles.main} testID="today-main">
            <DayHeader {...chooserProps} wide />
            {hasRuns ? (
              <View style={styles.mainRow}>
                <View style={styles.main}>{dayBody}</View>
                <View style={styles.runsPane}>{runList}</View>
              </View>
            ) : (
              dayBody
            )}
          </View>
        </View>
      </Screen>
    );
  }

  return (
    <Screen testID="skater-home">
      {greeting}
      {syncLine}
      <View style={styles.days}>
        <DayHeader {...chooserProps} />
        <RecentDays {...chooserProps} wide={false} />
      </View>
      {dayBody}
      {runList}
      <SafetyNote />
      {signOutButton}
    </Screen>
  );
}

const styles = StyleSheet.create({
  greeting: { gap: spacing.xxs },
  days: { gap: spacing.sm },
  empty: {
    gap: spacing.sm,
    padding: spacing.lg,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.divider,
    backgroundColor: colors.surface,
  },
  start: { alignSelf: 'flex-start' },
  groups: { gap: spacing.lg },
  summaryRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  grow: { flexGrow: 1, flexShrink: 1 },
  group: { gap: spacing.sm },
  phaseTitle: { borderBottomWidth: 2, borderBottomColor: colors.primary, paddingBottom: spacing.xxs },
  cards: { gap: spacing.sm },
  cardsWide: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  // Two columns of equal cards (a lone card keeps its width, not a pane-wide button).
  cardWide: { width: '48%' },
  wideRow: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.xl },
  side: {
    width: layout.railWidth + 112,
    gap: spacing.lg,
    padding: spacing.lg,
    borderRadius: radius.lg,
    backgroundColor: colors.surfaceSunken,
  },
  main: { flex: 1, minWidth: 0, gap: spacing.lg },
  // Runs beside the cues: the cues keep the wider column.
  mainRow: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.lg },
  runsPane: { width: 420 },
});
