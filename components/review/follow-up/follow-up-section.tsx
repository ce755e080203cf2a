/**
 * The evening review's Cue follow-up (issue #10 §3): for the skater picked in the review's list,
 * every cue stressed in the weeks shown (at least N "needs work" marks in a week, N on the
 * stepper, default 3), each with the four weeks after it (good marks out of all marks, the mean
 * lap of the skater's most-timed distance with its runs) and the verdict with the counts it rests
 * on. The rule (shared/follow-up.ts) is written under the list. The server counts and decides;
 * the screen only shows. Wide: the skater list beside the results; phone: stacked, the list folded
 * to one line once a skater is picked.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { DEFAULT_STRESS_THRESHOLD, FOLLOW_UP_RULE, LAP_RULE } from '../../../shared/follow-up';
import type { ReviewGroup } from '../../../shared/schemas/review';
import { weekOf } from '../../../shared/weeks';
import type { WeekRangeAsked } from '../../../store/review';
import { followUpQuery } from '../../../store/review-follow-up';
import { Banner, Button, Card, Heading, Text, spacing } from '../../ui';
import { RangeEntry, RangeNav } from '../range-controls';
import type { ReviewSectionProps } from '../section-props';
import { SkaterPane } from '../skater-pane';
import { FollowUpItemCard, itemKey } from './follow-up-item';
import { ThresholdStepper } from './threshold-stepper';
import { basisWords } from './words';

export function FollowUpSection({ teamId, skaters, groups, skaterId, group: startGroup, onPickSkater, timeZone, wide }: ReviewSectionProps) {
  const [threshold, setThreshold] = useState(DEFAULT_STRESS_THRESHOLD);
  const [range, setRange] = useState<WeekRangeAsked>(null);
  const [group, setGroup] = useState<ReviewGroup>(startGroup);
  const [search, setSearch] = useState('');
  const [showRetired, setShowRetired] = useState(false);
  const [listOpen, setListOpen] = useState(false);

  const skater = skaters.find((s) => s.id === skaterId) ?? null;
  const result = useQuery({ ...followUpQuery(teamId, skaterId ?? '', threshold, range), enabled: !!teamId && !!skaterId });
  const data = result.data;
  const zone = data?.timeZone ?? timeZone;
  const currentWeek = data?.currentWeek ?? weekOf(Date.now(), zone);

  const listShown = wide || !skater || listOpen;
  const who =
    !wide && skater && !listOpen ? (
      <View style={styles.compactWho} testID="follow-up-who">
        <Text weight="bold" style={styles.grow}>{`Skater: ${skater.displayName}`}</Text>
        <Button label="Change skater" variant="secondary" onPress={() => setListOpen(true)} testID="follow-up-change-skater" />
      </View>
    ) : (
      <Card testID="follow-up-who" style={wide ? styles.paneWide : undefined}>
        <Heading level={2}>Skaters</Heading>
        <SkaterPane
          groups={[...groups]}
          skaters={[...skaters]}
          group={group}
          onGroup={setGroup}
          search={search}
          onSearch={setSearch}
          showRetired={showRetired}
          onShowRetired={setShowRetired}
          selectedId={skaterId}
          onSelect={(s) => {
            onPickSkater(s.id);
            setListOpen(false);
          }}
          listShown={listShown}
        />
      </Card>
    );

  let body;
  if (!skater) {
    body = (
      <Text tone="muted" testID="follow-up-pick-skater">
        Pick a skater to see which cues were stressed for them and what followed.
      </Text>
    );
  } else if (result.isPending && !data) {
    body = (
      <Text tone="muted" role="status" testID="follow-up-loading">
        Loading the follow-up…
      </Text>
    );
  } else if (result.isError && !data) {
    body = (
      <View style={styles.stack}>
        <Banner kind="error" title="Could not load the follow-up" testID="follow-up-error">
          {result.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" onPress={() => void result.refetch()} testID="follow-up-retry" />
      </View>
    );
  } else if (data) {
    body = (
      <View style={styles.stack}>
        <RangeNav shown={{ from: data.from, to: data.to }} currentWeek={currentWeek} isDefault={range === null} onRange={setRange} compact={!wide} />
        {result.isPlaceholderData ? (
          <Text tone="muted" role="status" testID="follow-up-loading">
            Loading what was asked for… (the list shows the previous answer)
          </Text>
        ) : null}
        {result.isError ? (
          <Banner kind="error" title="Showing the follow-up loaded earlier" testID="follow-up-error">
            {result.error.message}
          </Banner>
        ) : null}
        <Text testID="follow-up-summary" aria-live="polite">
          {data.items.length === 0
            ? `No cue got ${data.threshold} or more \u201Cneeds work\u201D marks in one week between ${data.from} and ${data.to}.`
            : `${data.items.length} stressed ${data.items.length === 1 ? 'cue-week' : 'cue-weeks'} between ${data.from} and ${data.to} (${data.threshold} or more \u201Cneeds work\u201D marks in a week), newest first.`}
        </Text>
        {data.lapBasis ? (
          <Text variant="caption" tone="muted" testID="follow-up-basis">
            {`Lap times are of ${basisWords(data.lapBasis)}: ${skater.displayName}\u2019s most-timed distance in these weeks and the four after (${data.lapBasis.runs} fully timed ${data.lapBasis.runs === 1 ? 'run' : 'runs'}).`}
          </Text>
        ) : null}
        {data.items.length > 0 ? (
          <View role="list" aria-label={`Stressed cues, ${skater.displayName}`} style={styles.list}>
            {data.items.map((item) => (
              <View role="listitem" key={itemKey(item)}>
                <FollowUpItemCard item={item} basis={data.lapBasis} compact={!wide} />
              </View>
            ))}
          </View>
        ) : null}
        <RangeEntry shown={{ from: data.from, to: data.to }} onRange={setRange} />
      </View>
    );
  }

  const results = (
    <Card testID="follow-up-pane" style={wide ? styles.mainWide : undefined}>
      <Heading level={2} testID="follow-up-heading">
        {skater ? `Follow-up: ${skater.displayName}` : 'Follow-up'}
      </Heading>
      <ThresholdStepper value={threshold} onChange={setThreshold} />
      {body}
      <Text variant="caption" tone="muted" testID="follow-up-rule">
        {FOLLOW_UP_RULE}
      </Text>
      <Text variant="caption" tone="muted">
        {LAP_RULE}
      </Text>
      <Text variant="caption" tone="muted">{`Weeks run Monday to Sunday in the team\u2019s time zone (${zone}).`}</Text>
    </Card>
  );

  return wide ? (
    <View style={styles.panes} testID="follow-up">
      {who}
      {results}
    </View>
  ) : (
    <View style={styles.stack} testID="follow-up">
      {who}
      {results}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.md },
  list: { gap: spacing.md },
  panes: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.lg },
  paneWide: { width: 300 },
  mainWide: { flex: 1, minWidth: 0 },
  compactWho: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  grow: { flexGrow: 1, flexShrink: 1 },
});
