/**
 * Evening: the review's first view (issue #10 §1). A "who" pane (group chips, search, skaters,
 * retired ones on request) beside the table pane, in three views:
 * - Whole group: cues x ISO weeks summed over 'All skaters', a group or 'No group' (the default);
 * - One skater: the same for a skater, each cell opening the notes behind it;
 * - One week: skaters x cues for a chosen week, each cell opening that skater's notes.
 * Counting is the server's (SQL over the whole team, weeks in the team's zone): a laptop that
 * never took part in a session sees everything, and offline it shows what it loaded last and says
 * the review needs the server. Wide: the panes side by side, the notes in a third; phone: stacked.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { ReviewGroup } from '../../shared/schemas/review';
import { addIsoWeeks, isIsoWeek, weekOf } from '../../shared/weeks';
import { useConnectivity } from '../../store/connectivity';
import { groupWeeksQuery, skaterWeeksQuery, weekGridQuery, type WeekRangeAsked } from '../../store/review';
import { useActiveMembership } from '../../store/session';
import { squadQuery } from '../../store/team';
import { Banner, Button, Card, ChoiceChips, Heading, Screen, Text, layout, spacing, useBreakpoint } from '../ui';
import { CellNotes, type CellSelection } from './cell-notes';
import { TREND_RULE, weekSpanText } from './format';
import { ReviewLegend } from './legend';
import { RangeEntry, RangeNav } from './range-controls';
import { SkaterPane, groupName } from './skater-pane';
import { WeekGrid } from './week-grid';
import { WeekMatrix } from './week-matrix';
import { ExportSection } from './export/export-section';
import { FollowUpSection } from './follow-up/follow-up-section';
import { LapTrendsSection } from './laps/lap-trends-section';
import type { ReviewSectionProps } from './section-props';
import { TidySection } from './tidy/tidy-section';

type View3 = 'group' | 'skater' | 'week';
/** The review's sections: the cue counts (the three views above) and the four beside them. */
type Section = 'counts' | 'laps' | 'follow-up' | 'tidy' | 'export';

const browserZone = () => {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
};

/** Words for a query's state: loading, failed (with the last data kept or not). */
function QueryState({
  pending,
  error,
  hasData,
  onRetry,
  what,
  testID,
  placeholder = false,
}: {
  pending: boolean;
  error: Error | null;
  hasData: boolean;
  onRetry: () => void;
  what: string;
  testID: string;
  /** The weeks on screen are the previous answer while the ones asked for load. */
  placeholder?: boolean;
}) {
  if ((pending && !hasData) || placeholder)
    return (
      <Text tone="muted" role="status" testID={`${testID}-loading`}>
        {placeholder ? `Loading the weeks asked for… (the table shows the previous ones)` : `Loading ${what}…`}
      </Text>
    );
  if (!error) return null;
  return (
    <View style={styles.stack}>
      <Banner kind="error" title={hasData ? 'Showing the counts loaded earlier' : `Could not load ${what}`} testID={`${testID}-error`}>
        {error.message}
      </Banner>
      <Button label="Try again" variant="secondary" testID={`${testID}-retry`} onPress={onRetry} />
    </View>
  );
}

export function ReviewScreen() {
  const membership = useActiveMembership();
  const teamId = membership?.teamId ?? '';
  const wide = useBreakpoint() === 'wide';
  const online = useConnectivity((s) => s.online);

  const [section, setSection] = useState<Section>('counts');
  const [view, setView] = useState<View3>('group');
  const [group, setGroup] = useState<ReviewGroup>('all');
  const [search, setSearch] = useState('');
  const [showRetired, setShowRetired] = useState(false);
  const [skaterId, setSkaterId] = useState<string | null>(null);
  const [range, setRange] = useState<WeekRangeAsked>(null);
  const [week, setWeek] = useState<string | null>(null);
  const [cell, setCell] = useState<CellSelection | null>(null);
  const [listOpen, setListOpen] = useState(false);

  const squad = useQuery({ ...squadQuery(teamId), enabled: !!teamId });
  const skaters = squad.data?.skaters ?? [];
  const groups = squad.data?.groups ?? [];
  const skater = skaters.find((s) => s.id === skaterId) ?? null;

  const skaterWeeks = useQuery({ ...skaterWeeksQuery(teamId, skaterId ?? '', range), enabled: !!teamId && view === 'skater' && !!skaterId });
  const groupWeeks = useQuery({ ...groupWeeksQuery(teamId, group, range), enabled: !!teamId && view === 'group' });
  const matrixQuery = view === 'skater' ? skaterWeeks : groupWeeks;
  const timeZone = skaterWeeks.data?.timeZone ?? groupWeeks.data?.timeZone ?? browserZone();
  const currentWeek = weekOf(Date.now(), timeZone);
  const shownWeek = week ?? currentWeek;
  const weekGrid = useQuery({ ...weekGridQuery(teamId, shownWeek, group), enabled: !!teamId && view === 'week' });

  const pickView = (next: View3) => {
    setView(next);
    setCell(null);
    if (next === 'week' && !week) setWeek(matrixQuery.data?.to ?? currentWeek);
  };
  const pickSkater = (id: string) => {
    setSkaterId(id);
    setView('skater');
    setCell(null);
    setListOpen(false);
  };
  const pickGroup = (next: ReviewGroup) => {
    setGroup(next);
    if (view !== 'skater') setCell(null);
  };

  const moveRange = (next: WeekRangeAsked) => {
    setRange(next);
    setCell(null);
  };

  const subject = view === 'skater' ? (skater?.displayName ?? 'a skater') : groupName(groups, group);

  // ---- the table pane ----
  let table;
  if (view === 'skater' && !skaterId) {
    table = (
      <Text tone="muted" testID="review-pick-skater">
        Pick a skater from the list to see their cues week by week.
      </Text>
    );
  } else if (view === 'week') {
    const grid = weekGrid.data;
    const prev = isIsoWeek(addIsoWeeks(shownWeek, -1)) ? addIsoWeeks(shownWeek, -1) : null;
    const next = shownWeek < currentWeek ? addIsoWeeks(shownWeek, 1) : null;
    table = (
      <View style={styles.stack}>
        <View style={styles.row}>
          <Button label={"\u2190 Week before"} variant="secondary" disabled={!prev} onPress={() => prev && (setWeek(prev), setCell(null))} testID="review-week-before" />
          <View>
            <Text weight="bold" testID="review-week-shown" aria-live="polite">{`Week ${shownWeek}`}</Text>
            <Text variant="caption" tone="muted">
              {weekSpanText(shownWeek)}
            </Text>
          </View>
          <Button
            label={"Week after \u2192"}
            variant="secondary"
            disabled={!next}
            accessibilityHint={next ? undefined : 'Not available: this is the current week'}
            onPress={() => next && (setWeek(next), setCell(null))}
            testID="review-week-after"
          />
        </View>
        {!next ? (
          <Text variant="caption" tone="muted">
            Week after is off: this is the current week.
          </Text>
        ) : null}
        <QueryState
          pending={weekGrid.isPending}
          error={weekGrid.error}
          hasData={!!grid}
          onRetry={() => void weekGrid.refetch()}
          what="the week"
          testID="review-week"
        />
        {grid && grid.skaters.length === 0 ? (
          <Text tone="muted" testID="review-empty">
            No notes in this week.
          </Text>
        ) : null}
        {grid && grid.skaters.length > 0 ? (
          <WeekGrid
            grid={grid}
            subject={subject}
            selected={cell && cell.week === grid.week ? cell : null}
            onOpenCell={(pick) => setCell({ ...pick, week: grid.week })}
          />
        ) : null}
      </View>
    );
  } else {
    const matrix = matrixQuery.data;
    table = (
      <View style={styles.stack}>
        {matrix ? (
          <RangeNav shown={{ from: matrix.from, to: matrix.to }} currentWeek={currentWeek} isDefault={range === null} onRange={moveRange} compact={!wide} />
        ) : null}
        <QueryState
          pending={matrixQuery.isPending}
          error={matrixQuery.error}
          hasData={!!matrix}
          placeholder={matrixQuery.isPlaceholderData}
          onRetry={() => void matrixQuery.refetch()}
          what="the counts"
          testID="review-matrix"
        />
        {matrix && matrix.rows.length === 0 ? (
          <Text tone="muted" testID="review-empty">
            No notes in these weeks.
          </Text>
        ) : null}
        {matrix && matrix.rows.length > 0 ? (
          <WeekMatrix
            matrix={matrix}
            subject={subject}
            compact={!wide}
            selected={view === 'skater' && cell ? cell : null}
            onOpenCell={
              view === 'skater' && skater
                ? (pick) => setCell({ ...pick, skaterId: skater.id, skaterName: skater.displayName })
                : undefined
            }
          />
        ) : null}
        {view === 'group' && matrix && matrix.rows.length > 0 ? (
          <Text variant="caption" tone="muted">
            Summed over the group. To read the notes behind a count, pick a skater or open One week.
          </Text>
        ) : null}
        {matrix ? <RangeEntry shown={{ from: matrix.from, to: matrix.to }} onRange={moveRange} /> : null}
      </View>
    );
  }

  const heading =
    view === 'week' ? `One week: ${subject}` : view === 'skater' ? (skater ? skater.displayName : 'One skater') : `Whole group: ${subject}`;

  const tablePane = (
    <Card testID="review-table-pane" style={wide ? styles.tableWide : styles.tablePhone}>
      <Heading level={2} testID="review-table-heading">
        {heading}
      </Heading>
      <ReviewLegend />
      {table}
      {view !== 'week' ? (
        <Text variant="caption" tone="muted" testID="review-trend-rule">
          {TREND_RULE}
        </Text>
      ) : null}
      {matrixQuery.data || weekGrid.data ? (
        <Text variant="caption" tone="muted">
          {`Weeks run Monday to Sunday in the team\u2019s time zone (${timeZone}).`}
        </Text>
      ) : null}
    </Card>
  );

  const phoneListShown = view === 'skater' ? !skaterId || listOpen : listOpen;
  // A phone with a skater's table open keeps the pane to one line: the table is what they came for.
  const phoneCompact = !wide && view === 'skater' && !!skater && !listOpen;
  const whoPane = phoneCompact ? (
    <View style={styles.compactWho} testID="review-who-pane">
      <Text weight="bold" style={styles.compactName}>{`Skater: ${skater.displayName}`}</Text>
      <Button label="Change skater" variant="secondary" onPress={() => setListOpen(true)} testID="review-list-toggle" />
    </View>
  ) : (
    <Card testID="review-who-pane" style={wide ? styles.paneWide : undefined}>
      <Heading level={2}>Skaters</Heading>
      {squad.isError && !squad.data ? (
        <Banner kind="error" testID="review-squad-error">
          {squad.error.message}
        </Banner>
      ) : null}
      <SkaterPane
        groups={groups}
        skaters={skaters}
        group={group}
        onGroup={pickGroup}
        search={search}
        onSearch={setSearch}
        showRetired={showRetired}
        onShowRetired={setShowRetired}
        selectedId={view === 'skater' ? skaterId : null}
        onSelect={(s) => pickSkater(s.id)}
        listShown={wide || phoneListShown}
      />
      {!wide ? (
        <Button
          label={phoneListShown ? 'Hide the skater list' : 'Choose a skater'}
          variant="secondary"
          onPress={() => setListOpen(!phoneListShown)}
          testID="review-list-toggle"
        />
      ) : null}
    </Card>
  );

  const notes = cell && teamId ? <CellNotes teamId={teamId} cell={cell} onClose={() => setCell(null)} /> : null;

  const sectionProps: ReviewSectionProps = {
    teamId,
    skaters,
    groups,
    skaterId,
    group,
    onPickSkater: (id) => {
      setSkaterId(id);
      setCell(null);
    },
    timeZone,
    wide,
  };
  const sectionChips = (
    <ChoiceChips<Section>
      label="Section"
      choices={[
        { value: 'counts', label: 'Cue counts', testID: 'review-section-counts' },
        { value: 'laps', label: 'Lap times', testID: 'review-section-laps' },
        { value: 'follow-up', label: 'Follow-up', testID: 'review-section-follow-up' },
        { value: 'tidy', label: 'Tidy-up', testID: 'review-section-tidy' },
        { value: 'export', label: 'Export and print', testID: 'review-section-export' },
      ]}
      value={section}
      onChange={setSection}
      testID="review-sections"
    />
  );
  const header = (
    <View style={styles.stack}>
      <Heading>Evening review</Heading>
      <Text tone="muted">
        Which cues each skater got, week by week, from every coach’s notes; lap times against targets; whether a stressed cue
        fades; the day’s notes tidied; and sheets to export or print.
      </Text>
    </View>
  );
  if (section !== 'counts') {
    const body =
      section === 'laps' ? (
        <LapTrendsSection {...sectionProps} />
      ) : section === 'follow-up' ? (
        <FollowUpSection {...sectionProps} />
      ) : section === 'tidy' ? (
        <TidySection {...sectionProps} />
      ) : (
        <ExportSection {...sectionProps} />
      );
    return (
      <Screen testID="review-home" edges={[]} width={wide ? 'full' : 'content'}>
        {header}
        {sectionChips}
        <View testID={`review-section-${section}-body`}>{body}</View>
      </Screen>
    );
  }

  return (
    <Screen testID="review-home" edges={[]} width={wide ? 'full' : 'content'}>
      {header}
      {sectionChips}
      {!online ? (
        <Banner kind="info" title="No connection to the server" testID="review-offline">
          {matrixQuery.data || weekGrid.data
            ? 'The review is counted on the server, so it needs a connection. Below are the counts this device loaded last.'
            : 'The review is counted on the server, so it needs a connection. Nothing was loaded on this device yet.'}
        </Banner>
      ) : null}
      <ChoiceChips<View3>
        label="Show"
        choices={[
          { value: 'group', label: 'Whole group', testID: 'review-view-group' },
          { value: 'skater', label: 'One skater', testID: 'review-view-skater' },
          { value: 'week', label: 'One week', testID: 'review-view-week' },
        ]}
        value={view}
        onChange={pickView}
        testID="review-views"
      />
      {wide ? (
        <View style={styles.panes}>
          {/* The notes open beside the table, over the skater list: the table keeps its 8 weeks in view. */}
          <View style={styles.sideWide}>
            {notes}
            {whoPane}
          </View>
          {tablePane}
        </View>
      ) : (
        <>
          {whoPane}
          {tablePane}
          {notes}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  panes: { flexDirection: 'row', gap: spacing.lg, alignItems: 'flex-start', maxWidth: layout.contentMaxWidth + 400 },
  sideWide: { width: 320, gap: spacing.lg },
  paneWide: { padding: spacing.md },
  tableWide: { flex: 1, minWidth: 0, padding: spacing.md },
  tablePhone: { padding: spacing.md },
  compactWho: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm },
  compactName: { flexShrink: 1 },
});
