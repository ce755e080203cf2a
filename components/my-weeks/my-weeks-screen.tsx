/**
 * "My weeks" (issue #10 §6): the skater's own cues week by week and their finished runs, read
 * only; a guardian sees the linked skater's. The cue table is the review's WeekMatrix (counts per
 * ISO week in the team's zone, from the server); a cell opens the notes behind it, shared notes
 * only. The runs come from the server too (review/skaters/:id/runs-by-week), so both cover the
 * same weeks, and so does "Did it stick?": the cue follow-up (shared/follow-up.ts) at the default
 * threshold, shown only when a cue was stressed. Nothing on this screen changes anything: the buttons move the weeks, open and close
 * a cell. Wide: the table beside the notes and runs; phone: stacked.
 */
import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { weekOf } from '../../shared/weeks';
import { useConnectivity } from '../../store/connectivity';
import { skaterWeeksQuery, type WeekRangeAsked } from '../../store/review';
import { followUpQuery, runsByWeekQuery } from '../../store/review-follow-up';
import { DEFAULT_STRESS_THRESHOLD, FOLLOW_UP_RULE } from '../../shared/follow-up';
import { FollowUpItemCard, itemKey } from '../review/follow-up/follow-up-item';
import { useActiveMembership } from '../../store/session';
import { useSkaterName } from '../../store/today';
import { Banner, Button, Card, Heading, Screen, Text, colors, fonts, spacing, tapTarget, type, useBreakpoint } from '../ui';
import { ReviewLegend } from '../review/legend';
import { RangeNav } from '../review/range-controls';
import { WeekMatrix } from '../review/week-matrix';
import { RunsByWeek } from './runs-by-week';
import { SharedNotes, type MyCell } from './shared-notes';

/**
 * Back to the today page this screen was opened from (the stack's previous screen, so a second
 * today page is not stacked on the first), or to it afresh when /weeks was opened directly.
 */
function BackToToday() {
  const router = useRouter();
  return (
    <Pressable
      accessibilityRole="link"
      onPress={() => (router.canGoBack() ? router.back() : router.replace('/today'))}
      style={styles.back}
      testID="my-weeks-back"
    >
      <Text style={styles.backText}>{'\u2190 Back to today'}</Text>
    </Pressable>
  );
}

const possessive = (name: string) => (name.endsWith('s') ? `${name}\u2019` : `${name}\u2019s`);

export function MyWeeksScreen() {
  const wide = useBreakpoint() === 'wide';
  const membership = useActiveMembership();
  const online = useConnectivity((s) => s.online);
  const teamId = membership?.teamId ?? '';
  const skaterId = membership?.skaterId ?? '';
  const guardian = membership?.role === 'guardian';
  const name = useSkaterName(teamId, skaterId);

  const [range, setRange] = useState<WeekRangeAsked>(null);
  const [cell, setCell] = useState<MyCell | null>(null);

  const weeks = useQuery({ ...skaterWeeksQuery(teamId, skaterId, range), enabled: !!teamId && !!skaterId });
  const runs = useQuery({ ...runsByWeekQuery(teamId, skaterId, range), enabled: !!teamId && !!skaterId });
  // The cues stressed in these weeks (3 or more "needs work" in a week) and what followed.
  const followUp = useQuery({ ...followUpQuery(teamId, skaterId, DEFAULT_STRESS_THRESHOLD, range), enabled: !!teamId && !!skaterId });
  const matrix = weeks.data;
  const zone = matrix?.timeZone ?? 'UTC';
  const currentWeek = weekOf(Date.now(), zone);
  const first = (name ?? '').trim().split(/\s+/)[0] || 'Your skater';
  const heading = guardian ? `${possessive(first)} weeks` : 'My weeks';

  const moveRange = (next: WeekRangeAsked) => {
    setRange(next);
    setCell(null);
  };

  const top = (
    <View style={styles.stack}>
      <BackToToday />
      <Heading testID="my-weeks-heading">{heading}</Heading>
      <Text tone="muted">
        {guardian
          ? `The cues ${first} got from the coaches, week by week, and the timed runs. You are viewing as a guardian: read only.`
          : 'The cues you got from your coaches, week by week, and your timed runs. Tap a count to read the notes shared with you.'}
      </Text>
      {!online ? (
        <Banner kind="info" title="No connection to the server" testID="my-weeks-offline">
          {matrix ? 'These weeks are counted on the server. Below is what this device loaded last.' : 'These weeks are counted on the server: they show once you are online.'}
        </Banner>
      ) : null}
    </View>
  );

  if (!skaterId)
    return (
      <Screen testID="my-weeks">
        {top}
        <Banner kind="info" testID="my-weeks-no-skater">
          This account is not linked to a skater profile yet. Ask your head coach to link it.
        </Banner>
      </Screen>
    );

  const table = (
    <Card testID="my-weeks-cues">
      <Heading level={2}>Cues by week</Heading>
      <ReviewLegend />
      {matrix ? (
        <RangeNav shown={{ from: matrix.from, to: matrix.to }} currentWeek={currentWeek} isDefault={range === null} onRange={moveRange} compact={!wide} />
      ) : null}
      {weeks.isPending && !matrix ? (
        <Text tone="muted" role="status" testID="my-weeks-loading">
          Loading your weeks…
        </Text>
      ) : null}
      {weeks.isError ? (
        <View style={styles.stack}>
          <Banner kind="error" title={matrix ? 'Showing the weeks loaded earlier' : 'Could not load the weeks'} testID="my-weeks-error">
            {weeks.error.message}
          </Banner>
          <Button label="Try again" variant="secondary" onPress={() => void weeks.refetch()} testID="my-weeks-retry" />
        </View>
      ) : null}
      {matrix && matrix.rows.length === 0 ? (
        <Text tone="muted" testID="my-weeks-empty">
          No cues in these weeks.
        </Text>
      ) : null}
      {matrix && matrix.rows.length > 0 ? (
        <WeekMatrix
          matrix={matrix}
          subject={guardian ? first : 'you'}
          compact={!wide}
          selected={cell}
          onOpenCell={(pick) => setCell({ ...pick, skaterId })}
        />
      ) : null}
      {matrix ? <Text variant="caption" tone="muted">{`Weeks run Monday to Sunday (${zone}).`}</Text> : null}
    </Card>
  );

  const runList = (
    <Card testID="my-weeks-runs-card">
      <Heading level={2}>Timed runs</Heading>
      {runs.isPending && !runs.data ? (
        <Text tone="muted" role="status">
          Loading the runs…
        </Text>
      ) : null}
      {runs.isError && !runs.data ? (
        <Banner kind="error" testID="my-weeks-runs-error">
          {runs.error.message}
        </Banner>
      ) : null}
      {runs.data ? <RunsByWeek weeks={runs.data.weeks} runs={runs.data.runs} /> : null}
    </Card>
  );

  const followUpCard = followUp.data && followUp.data.items.length > 0 ? (
    <Card testID="my-weeks-follow-up">
      <Heading level={2}>Did it stick?</Heading>
      <Text tone="muted">
        {`Cues marked \u201Cneeds work\u201D ${DEFAULT_STRESS_THRESHOLD} or more times in one week, and how the four weeks after went.`}
      </Text>
      <View role="list" aria-label="Cues that needed work, and after" style={styles.stack}>
        {followUp.data.items.map((item) => (
          <View role="listitem" key={itemKey(item)}>
            <FollowUpItemCard item={item} basis={followUp.data.lapBasis} compact={!wide} />
          </View>
        ))}
      </View>
      <Text variant="caption" tone="muted">
        {FOLLOW_UP_RULE}
      </Text>
    </Card>
  ) : null;

  const notes = cell ? <SharedNotes teamId={teamId} cell={cell} onClose={() => setCell(null)} /> : null;

  return (
    <Screen testID="my-weeks" width={wide ? 'full' : 'content'}>
      {top}
      {wide ? (
        <View style={styles.panes}>
          <View style={styles.mainWide}>
            {table}
            {followUpCard}
          </View>
          <View style={styles.side}>
            {notes}
            {runList}
          </View>
        </View>
      ) : (
        <>
          {table}
          {notes}
          {followUpCard}
          {runList}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.sm },
  panes: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.lg },
  mainWide: { flex: 1, minWidth: 0, gap: spacing.lg },
  side: { width: 440, gap: spacing.lg },
  // Looks like the kit's TextLink (underlined, bold, 48 px tall), which only takes an href.
  back: { minHeight: tapTarget, justifyContent: 'center', alignSelf: 'flex-start' },
  backText: { ...type.body, fontFamily: fonts.bold, color: colors.primary, textDecorationLine: 'underline' },
});
