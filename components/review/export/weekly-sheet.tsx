/**
 * A skater's weekly sheet (issue #10 §5): one page, black on white, to hand to a skater without a
 * phone: their name, the ISO week and its dates, each cue marked that week with its needs-work
 * and good counts, the notes shared with them (never the private ones: the server leaves them
 * out), and their runs (distance, finish, laps).
 *
 * On the web the sheet injects a print stylesheet while it is open: everything but the sheet is
 * hidden (the coach's rail, the tab bar, the review's controls, the sheet's own buttons), the
 * sheet sits at the page's top-left, and every colour becomes black on white. The Print button
 * calls window.print(). Shown in place under the Export section, inside the coach area.
 */
import { useQuery } from '@tanstack/react-query';
import { useEffect } from 'react';
import { Platform, StyleSheet, View } from 'react-native';

import type { WeeklySheet } from '../../../shared/schemas/review-export';
import { weeklySheetQuery } from '../../../store/review-export';
import { distanceLabel, trackLabel } from '../../clock/clock-math';
import { Banner, Button, Heading, Text, colors, spacing } from '../../ui';
import { longDay, weekSpanText } from '../format';

export const SHEET_TEST_ID = 'weekly-sheet';
const PRINT_STYLE_ID = 'boardside-weekly-sheet-print';

/**
 * The print stylesheet: only the sheet prints, black on white, on one A4 page. Everything that
 * neither holds the sheet nor sits inside it is not displayed (the rail, the tab bar, the top
 * bar, the review's controls); the boxes that hold it lose their padding, heights and scrolling,
 * so the sheet flows from the page's top-left corner. (A fixed position would not do: the
 * navigator's screen wrapper is the containing block of fixed boxes inside it.)
 */
const SHEET = `[data-testid="${SHEET_TEST_ID}"]`;
const PRINT_CSS = `
@media print {
  @page { size: A4 portrait; margin: 12mm; }
  html, body, #root { background: #fff !important; height: auto !important; min-height: 0 !important; overflow: visible !important; }
  body *:not(:has(${SHEET})):not(${SHEET}):not(${SHEET} *) { display: none !important; }
  body *:has(${SHEET}) {
    display: block !important; position: static !important; transform: none !important;
    margin: 0 !important; padding: 0 !important; border: none !important; background: #fff !important;
    width: auto !important; max-width: none !important; height: auto !important; min-height: 0 !important;
    max-height: none !important; overflow: visible !important; flex: none !important;
  }
  ${SHEET} { width: 100% !important; max-width: none !important; margin: 0 !important; padding: 0 !important; border: none !important; }
  ${SHEET}, ${SHEET} * { color: #000 !important; background: #fff !important; border-color: #000 !important; box-shadow: none !important; }
  [data-testid="${SHEET_TEST_ID}-actions"] { display: none !important; }
}`;

/** Puts the print stylesheet in the page while a sheet is open (web only). */
function usePrintStyle() {
  useEffect(() => {
    if (Platform.OS !== 'web' || typeof document === 'undefined') return;
    let style = document.getElementById(PRINT_STYLE_ID);
    if (!style) {
      style = document.createElement('style');
      style.id = PRINT_STYLE_ID;
      style.textContent = PRINT_CSS;
      document.head.appendChild(style);
    }
    return () => document.getElementById(PRINT_STYLE_ID)?.remove();
  }, []);
}

/**
 * Most notes and runs a sheet prints: enough for a week's talk, few enough for one page (a week
 * with more says how many are left off; they are all in the app and the export).
 */
export const SHEET_MAX_NOTES = 10;
export const SHEET_MAX_RUNS = 10;

const leftOff = (n: number, one: string, many: string) =>
  `${n} more ${n === 1 ? one : many} this week ${n === 1 ? 'is' : 'are'} not on this page`;

const markWord = (mark: 'needs_work' | 'good') => (mark === 'good' ? 'good' : 'needs work');
const phaseWord = (phase: string | null) => (phase ? phase.charAt(0).toUpperCase() + phase.slice(1) : '');

function SheetBody({ sheet }: { sheet: WeeklySheet }) {
  const weekNumber = Number(sheet.week.slice(-2));
  return (
    <View style={styles.body}>
      <View style={styles.head}>
        <Text variant="caption" style={styles.ink}>
          Boardside · weekly sheet
        </Text>
        <Heading level={2} style={styles.ink} testID={`${SHEET_TEST_ID}-name`}>
          {sheet.skater.displayName}
        </Heading>
        <Text weight="bold" style={styles.ink} testID={`${SHEET_TEST_ID}-week`}>
          Week {weekNumber} of {sheet.week.slice(0, 4)} ({sheet.week}) · {weekSpanText(sheet.week)}
        </Text>
        {sheet.skater.groupName ? <Text style={styles.ink}>Group: {sheet.skater.groupName}</Text> : null}
      </View>

      <View style={styles.part}>
        <Heading level={3} style={styles.ink}>
          Cues this week
        </Heading>
        {sheet.cues.length === 0 ? (
          <Text style={styles.ink} testID={`${SHEET_TEST_ID}-no-cues`}>
            No cues marked this week.
          </Text>
        ) : (
          <View role="table" aria-label="Cues this week with needs-work and good counts" style={styles.table}>
            <View role="row" style={[styles.row, styles.headRow]}>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.cueCol]}>
                Cue
              </Text>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.numCol]}>
                Needs work
              </Text>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.numCol]}>
                Good
              </Text>
            </View>
            {sheet.cues.map((cue) => (
              <View role="row" key={cue.cueId} style={styles.row} testID={`${SHEET_TEST_ID}-cue-${cue.cueId}`}>
                <Text role="cell" style={[styles.ink, styles.cueCol]}>
                  {cue.label} <Text variant="caption" style={styles.ink}>({phaseWord(cue.phase)})</Text>
                </Text>
                <Text role="cell" numeric style={[styles.ink, styles.numCol]} testID={`${SHEET_TEST_ID}-cue-${cue.cueId}-needs-work`}>
                  {cue.needsWork}
                </Text>
                <Text role="cell" numeric style={[styles.ink, styles.numCol]} testID={`${SHEET_TEST_ID}-cue-${cue.cueId}-good`}>
                  {cue.good}
                </Text>
              </View>
            ))}
          </View>
        )}
      </View>

      <View style={styles.part}>
        <Heading level={3} style={styles.ink}>
          Notes for you
        </Heading>
        {sheet.notes.length === 0 ? (
          <Text style={styles.ink}>No notes shared this week.</Text>
        ) : (
          sheet.notes.slice(0, SHEET_MAX_NOTES).map((note) => (
            <View key={note.id} style={styles.note} testID={`${SHEET_TEST_ID}-note-${note.id}`}>
              <Text variant="caption" weight="bold" style={styles.ink}>
                {longDay(note.day)} {note.time} · {note.cueLabel || 'A cue no longer in the library'} · {markWord(note.mark)}
                {note.authorName ? ` · ${note.authorName}` : ''}
              </Text>
              <Text style={styles.ink}>{note.note}</Text>
            </View>
          ))
        )}
        {sheet.notes.length > SHEET_MAX_NOTES ? (
          <Text variant="caption" style={styles.ink} testID={`${SHEET_TEST_ID}-more-notes`}>
            {leftOff(sheet.notes.length - SHEET_MAX_NOTES, 'shared note', 'shared notes')} (the first {SHEET_MAX_NOTES} are).
          </Text>
        ) : null}
      </View>

      <View style={styles.part}>
        <Heading level={3} style={styles.ink}>
          Runs
        </Heading>
        {sheet.runs.length === 0 ? (
          <Text style={styles.ink}>No timed runs this week.</Text>
        ) : (
          <View role="table" aria-label="Runs this week" style={styles.table}>
            <View role="row" style={[styles.row, styles.headRow]}>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.dayCol]}>
                Day
              </Text>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.distCol]}>
                Distance
              </Text>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.finishCol]}>
                Finish
              </Text>
              <Text role="columnheader" weight="bold" style={[styles.ink, styles.lapsCol]}>
                Laps
              </Text>
            </View>
            {sheet.runs.slice(0, SHEET_MAX_RUNS).map((run) => (
              <View role="row" key={run.id} style={styles.row} testID={`${SHEET_TEST_ID}-run-${run.id}`}>
                <Text role="cell" style={[styles.ink, styles.dayCol]}>
                  {longDay(run.day)} {run.time}
                </Text>
                <Text role="cell" style={[styles.ink, styles.distCol]}>
                  {distanceLabel(run.distanceM)}, {trackLabel(run.track).toLowerCase()}
                </Text>
                <Text role="cell" numeric style={[styles.ink, styles.finishCol]} testID={`${SHEET_TEST_ID}-run-${run.id}-finish`}>
                  {run.finish ?? (run.status === 'stopped' ? 'stopped' : '—')}
                  {run.target ? ` (target ${run.target})` : ''}
                </Text>
                <Text role="cell" numeric style={[styles.ink, styles.lapsCol]}>
                  {run.laps.length > 0 ? run.laps.join('  ') : '—'}
                </Text>
              </View>
            ))}
          </View>
        )}
        {sheet.runs.length > SHEET_MAX_RUNS ? (
          <Text variant="caption" style={styles.ink} testID={`${SHEET_TEST_ID}-more-runs`}>
            {leftOff(sheet.runs.length - SHEET_MAX_RUNS, 'run', 'runs')} (the first {SHEET_MAX_RUNS} are).
          </Text>
        ) : null}
      </View>
      <Text variant="caption" style={styles.ink}>
        Times: hundredths cut off, not rounded. The first lap of a distance that is not whole laps is its opener. Days in {sheet.timeZone}.
      </Text>
    </View>
  );
}

export function WeeklySheetView({ teamId, skaterId, week, onClose }: { teamId: string; skaterId: string; week: string; onClose: () => void }) {
  usePrintStyle();
  const sheet = useQuery(weeklySheetQuery(teamId, skaterId, week));
  const print = () => {
    if (Platform.OS === 'web' && typeof window !== 'undefined' && typeof window.print === 'function') window.print();
  };
  return (
    <View style={styles.frame} testID={SHEET_TEST_ID} role="region" aria-label="Weekly sheet">
      <View style={styles.actions} testID={`${SHEET_TEST_ID}-actions`}>
        <Button label="Print" onPress={print} disabled={!sheet.data} testID={`${SHEET_TEST_ID}-print`} />
        <Button label="Close the sheet" variant="secondary" onPress={onClose} testID={`${SHEET_TEST_ID}-close`} />
        {Platform.OS === 'web' ? (
          <Text variant="caption" tone="muted" style={styles.actionsHint}>
            Prints on one page, black on white, without the app around it.
          </Text>
        ) : null}
      </View>
      {sheet.data ? (
        <SheetBody sheet={sheet.data} />
      ) : sheet.error ? (
        <Banner kind="error" title="Could not load the sheet" testID={`${SHEET_TEST_ID}-error`}>
          {sheet.error.message}
        </Banner>
      ) : (
        <Text tone="muted" role="status">
          Loading the sheet…
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  frame: {
    backgroundColor: '#FFFFFF',
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.md,
    gap: spacing.md,
    maxWidth: 820,
    alignSelf: 'stretch',
  },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs, alignItems: 'center' },
  actionsHint: { flexShrink: 1 },
  body: { gap: spacing.md },
  head: { gap: spacing.xxs, borderBottomWidth: 2, borderColor: '#000000', paddingBottom: spacing.xs },
  ink: { color: '#000000' },
  part: { gap: spacing.xs },
  table: { borderTopWidth: 1, borderColor: '#000000' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderColor: '#000000', paddingVertical: spacing.xxs, gap: spacing.xs },
  headRow: { borderBottomWidth: 2 },
  cueCol: { flex: 3 },
  numCol: { flex: 1, textAlign: 'right' },
  dayCol: { flex: 2 },
  distCol: { flex: 2 },
  finishCol: { flex: 2 },
  lapsCol: { flex: 3 },
  note: { gap: 2, borderLeftWidth: 3, borderColor: '#000000', paddingLeft: spacing.xs },
});
