/**
 * The evening review's Cue follow-up (issue #10 §3): for the skater picked in the review's list,
 * every cue stressed in the weeks shown (at least N "needs work" marks in a week, N on the
 * stepper, default 3), each with the four weeks after it (good marks out of all marks, the mean
 * lap of the skater's most-timed distance with its runs) and the verdict with the counts it rests
 * on. "Whole group" shows the same for every skater of the group chosen in the list who has a
 * stressed cue. The rule (shared/follow-up.ts) is written under the list. The server counts and decides;
 * the screen only shows. Wide: the skater list beside the results; phone: stacked, the list folded
 * to one line once a skater is picked.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { DEFAULT_STRESS_THRESHOLD, FOLLOW_UP_RULE, LAP_RULE } from '../../../shared/follow-up';
import type { ReviewGroup } from '../../../shared/schemas/review';
import type { GroupFollowUpReply } from '../../../shared/schemas/review-follow-up';
import { weekOf } from '../../../shared/weeks';
import type { WeekRangeAsked } from '../../../store/review';
import { followUpQuery, groupFollowUpQuery } from '../../../store/review-follow-up';
import { Banner, Button, Card, ChoiceChips, Heading, Text, spacing } from '../../ui';
import { RangeEntry, RangeNav } from '../range-controls';
import type { ReviewSectionProps } from '../section-props';
import { SkaterPane, groupName } from '../skater-pane';
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
  const [mode, setMode] = useState<'skater' | 'group'>('skater');

  const skater = skaters.find((s) => s.id === skaterId) ?? null;
  const result = useQuery({ ...followUpQuery(teamId, skaterId ?? '', threshold, range), enabled: !!teamId && !!skaterId && mode === 'skater' });
  const groupResult = useQuery({ ...groupFollowUpQuery(teamId, group, threshold, range), enabled: !!teamId && mode === 'group' });
  const data = result.data;
  const shownRange = mode === 'group' ? groupResult.data : data;
  const zone = shownRange?.timeZone ?? timeZone;
  const currentWeek = shownRange?.currentWeek ?? weekOf(Date.now(), zone);

  const listShown = mode === 'skater' && (wide || !skater || listOpen);
  const who =
    mode === 'skater' && !wide && skater && !listOpen ? (
      <View style={styles.compactWho} testID="follow-up-who">
        <Text weight="bold" style={styles.grow}>{`Skater: ${skater.displayName}`}</Text>
        <Button label="Change skater" variant="secondary" onPress={() => setListOpen(true)} testID="follow-up-change-skater" />
      </View>
    ) : (
      <Card testID="follow-up-who" style={wide ? styles.paneWide : undefined}>
        <Heading level={2}>{mode === 'group' ? 'Group' : 'Skaters'}</Heading>
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
  if (mode === 'group') {
    body = (
      <GroupBody
        result={groupResult}
        wide={wide}
        currentWeek={currentWeek}
        isDefault={range === null}
        onRange={setRange}
        groupLabel={groupName([...groups], group)}
        onOpenSkater={(id) => {
          onPickSkater(id);
          setMode('skater');
        }}
      />
    );
  } else if (!skater) {
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
        {mode === 'group' ? `Follow-up: ${groupName([...groups], group)}` : skater ? `Follow-up: ${skater.displayName}` : 'Follow-up'}
      </Heading>
      <ChoiceChips<'skater' | 'group'>
        label="Show"
        choices={[
          { value: 'skater', label: 'One skater', testID: 'follow-up-mode-skater' },
          { value: 'group', label: 'Whole group', testID: 'follow-up-mode-group' },
        ]}
        value={mode}
        onChange={setMode}
        testID="follow-up-mode"
      />
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

type GroupResult = ReturnType<typeof useQuery<GroupFollowUpReply>>;

/** Every skater of the group with a stressed cue, by name, each with their cards. */
function GroupBody({
  result,
  wide,
  currentWeek,
  isDefault,
  onRange,
  groupLabel,
  onOpenSkater,
}: {
  result: GroupResult;
  wide: boolean;
  currentWeek: string;
  isDefault: boolean;
  onRange: (range: WeekRangeAsked) => void;
  groupLabel: string;
  onOpenSkater: (id: string) => void;
}) {
  const data = result.data;
  if (result.isPending && !data)
    return (
      <Text tone="muted" role="status" testID="follow-up-loading">
        Loading the group's follow-up…
      </Text>
    );
  if (result.isError && !data)
    return (
      <View style={styles.stack}>
        <Banner kind="error" title="Could not load the follow-up" testID="follow-up-error">
          {result.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" onPress={() => void result.refetch()} testID="follow-up-retry" />
      </View>
    );
  if (!data) return null;
  const count = data.skaters.reduce((n, s) => n + s.items.length, 0);
  return (
    <View style={styles.stack}>
      <RangeNav shown={{ from: data.from, to: data.to }} currentWeek={currentWeek} isDefault={isDefault} onRange={onRange} compact={!wide} />
      {result.isPlaceholderData ? (
        <Text tone="muted" role="status" testID="follow-up-loading">
          Loading what was asked for… (the list shows the previous answer)
        </Text>
      ) : null}
      <Text testID="follow-up-summary" aria-live="polite">
        {count === 0
          ? `No cue got ${data.threshold} or more \u201Cneeds work\u201D marks in one week for anyone in ${groupLabel} between ${data.from} and ${data.to}.`
          : `${data.skaters.length === 1 ? '1 skater' : `${data.skaters.length} skaters`} in ${groupLabel} with a stressed cue between ${data.from} and ${data.to} (${count} cue-${count === 1 ? 'week' : 'weeks'}, ${data.threshold} or more \u201Cneeds work\u201D marks in a week).`}
      </Text>
      {data.skaters.map((s) => (
        <View key={s.skaterId} style={styles.stack} testID={`follow-up-skater-${s.skaterId}`}>
          <View style={styles.compactWho}>
            <Heading level={3} style={styles.grow}>{`${s.displayName} (${s.items.length})`}</Heading>
            <Button
              label="Only this skater"
              variant="secondary"
              accessibilityLabel={`Only ${s.displayName}`}
              onPress={() => onOpenSkater(s.skaterId)}
              testID={`follow-up-open-${s.skaterId}`}
            />
          </View>
          {s.lapBasis ? (
            <Text variant="caption" tone="muted">{`Lap times of ${basisWords(s.lapBasis)}, ${s.displayName}\u2019s most-timed distance.`}</Text>
          ) : null}
          <View role="list" aria-label={`Stressed cues, ${s.displayName}`} style={styles.list}>
            {s.items.map((item) => (
              <View role="listitem" key={itemKey(item)}>
                <FollowUpItemCard item={item} basis={s.lapBasis} compact={!wide} skaterId={s.skaterId} />
              </View>
            ))}
          </View>
        </View>
      ))}
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
