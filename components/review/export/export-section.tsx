/**
 * The evening review's Export and print section (issue #10 §5).
 *
 * - CSV export: notes or timed runs, a range of days in the team's zone (the last four weeks by
 *   default, at most 366 days), every skater or some (a group's skaters in one tap). The fields
 *   are checked with the server's own schema before asking; Download fetches the file through
 *   the API client (the sign-in's token) and hands it to the browser, then says how many rows and
 *   bytes it held. Private notes are in the export: it is for coaches, and the screen says so.
 * - A weekly sheet to print: pick a skater and an ISO week, and the sheet opens below with a
 *   Print button (weekly-sheet.tsx); it holds shared notes only, as it goes to the skater.
 */
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { MAX_EXPORT_DAYS, type ExportKind } from '../../../shared/schemas/review-export';
import { isIsoWeek, weekOf } from '../../../shared/weeks';
import { isApiRequestError } from '../../../store/api';
import { defaultExportRange, downloadExport, exportProblems, sizeText, type Downloaded, type ExportAsk } from '../../../store/review-export';
import { Banner, Button, Card, ChoiceChips, Heading, Text, TextField, chipStyles, plural, spacing } from '../../ui';
import { weekSpanText } from '../format';
import type { ReviewSectionProps } from '../section-props';
import { WeeklySheetView } from './weekly-sheet';

type Who = { mode: 'all' } | { mode: 'some'; ids: ReadonlySet<string> };

/** A chip that toggles (several may be on): a checkbox for screen readers, a tick when on. */
function ToggleChip({ label, on, onPress, testID }: { label: string; on: boolean; onPress: () => void; testID: string }) {
  return (
    <Pressable
      testID={testID}
      role="checkbox"
      aria-checked={on}
      accessibilityLabel={label}
      onPress={onPress}
      style={[chipStyles.chip, on && chipStyles.chipOn]}
    >
      <Text weight={on ? 'bold' : 'regular'} tone={on ? 'inverse' : 'default'}>
        {on ? '\u2713 ' : ''}
        {label}
      </Text>
    </Pressable>
  );
}

function ExportForm({ teamId, skaters, groups, timeZone, wide }: ReviewSectionProps) {
  const [kind, setKind] = useState<ExportKind>('observations');
  const [range] = useState(() => defaultExportRange(timeZone));
  const [from, setFrom] = useState(range.from);
  const [to, setTo] = useState(range.to);
  const [who, setWho] = useState<Who>({ mode: 'all' });
  const [checked, setChecked] = useState(false);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState<Downloaded | null>(null);
  const [failure, setFailure] = useState<{ message: string; fields?: Record<string, string> } | null>(null);

  const live = skaters.filter((s) => !s.retired);
  const retired = skaters.filter((s) => s.retired);
  const picked = who.mode === 'some' ? who.ids : null;
  const ask: ExportAsk = { kind, from, to, skaterIds: picked ? [...picked] : null };
  const problems = exportProblems(ask);
  const shownProblems = checked ? { ...problems, ...(failure?.fields ?? {}) } : (failure?.fields ?? {});

  const toggle = (id: string) => {
    const next = new Set(picked ?? []);
    if (next.has(id)) next.delete(id);
    else next.add(id);
    setWho({ mode: 'some', ids: next });
    setDone(null);
  };
  const pickGroup = (groupId: string) => {
    setWho({ mode: 'some', ids: new Set(live.filter((s) => s.groupId === groupId).map((s) => s.id)) });
    setDone(null);
  };
  const groupPicked = (groupId: string) => {
    if (!picked) return false;
    const members = live.filter((s) => s.groupId === groupId).map((s) => s.id);
    return members.length > 0 && members.length === picked.size && members.every((id) => picked.has(id));
  };

  const download = async () => {
    setChecked(true);
    setDone(null);
    setFailure(null);
    if (Object.keys(problems).length > 0) return;
    setBusy(true);
    try {
      setDone(await downloadExport(teamId, ask));
    } catch (error) {
      setFailure(
        isApiRequestError(error) ? { message: error.message, fields: error.fields } : { message: error instanceof Error ? error.message : String(error) },
      );
    } finally {
      setBusy(false);
    }
  };

  const whoText =
    who.mode === 'all' ? 'Every skater, retired ones too' : picked && picked.size > 0 ? `${plural(picked.size, 'skater', 'skaters')} picked` : 'No skater picked';

  return (
    <Card>
      <View style={styles.stack} testID="export-form">
        <Heading level={2}>Export to a spreadsheet (CSV)</Heading>
        <Text tone="muted" testID="export-private-note">
          The file holds private notes too: they are the coaches’ own notes, and only coaches can export. Days and times are in the
          team’s time zone ({timeZone}).
        </Text>
        <ChoiceChips<ExportKind>
          label="What"
          choices={[
            { value: 'observations', label: 'Notes (cues and marks)', testID: 'export-kind-observations' },
            { value: 'runs', label: 'Timed runs', testID: 'export-kind-runs' },
          ]}
          value={kind}
          onChange={(next) => {
            setKind(next);
            setDone(null);
          }}
          testID="export-kind"
          error={shownProblems.kind}
        />
        <View style={wide ? styles.fieldsRow : styles.stack}>
          <View style={wide ? styles.field : undefined}>
            <TextField
              label="From (first day)"
              hint="YYYY-MM-DD"
              value={from}
              onChangeText={(v) => {
                setFrom(v);
                setDone(null);
              }}
              error={shownProblems.from}
              autoCapitalize="none"
              autoCorrect={false}
              inputMode="numeric"
              testID="export-from"
            />
          </View>
          <View style={wide ? styles.field : undefined}>
            <TextField
              label="To (last day, included)"
              hint={`YYYY-MM-DD, at most ${MAX_EXPORT_DAYS} days after the first`}
              value={to}
              onChangeText={(v) => {
                setTo(v);
                setDone(null);
              }}
              error={shownProblems.to}
              autoCapitalize="none"
              autoCorrect={false}
              inputMode="numeric"
              testID="export-to"
            />
          </View>
        </View>
        <Button
          label="Last 4 weeks"
          variant="quiet"
          onPress={() => {
            const fresh = defaultExportRange(timeZone);
            setFrom(fresh.from);
            setTo(fresh.to);
          }}
          testID="export-last-4-weeks"
          style={styles.quiet}
        />

        <View style={styles.stack}>
          <Text weight="bold">Skaters</Text>
          <Text tone="muted" testID="export-who">
            {whoText}
          </Text>
          <View style={styles.chips} role="group" aria-label="Skaters: everyone or a group">
            <ToggleChip label="Every skater" on={who.mode === 'all'} onPress={() => setWho({ mode: 'all' })} testID="export-all-skaters" />
            {groups.map((g) => (
              <ToggleChip
                key={g.id}
                label={`Group ${g.name}`}
                on={groupPicked(g.id)}
                onPress={() => pickGroup(g.id)}
                testID={`export-group-${g.id}`}
              />
            ))}
          </View>
          <View style={styles.chips} role="group" aria-label="Skaters to export">
            {[...live, ...retired].map((s) => (
              <ToggleChip
                key={s.id}
                label={s.retired ? `${s.displayName} (retired)` : s.displayName}
                on={picked?.has(s.id) ?? false}
                onPress={() => toggle(s.id)}
                testID={`export-skater-${s.id}`}
              />
            ))}
          </View>
          {shownProblems.skaterIds ? (
            <Text tone="error" variant="caption" weight="bold" testID="export-skaters-error">
              {'\u26A0 '}
              {shownProblems.skaterIds}
            </Text>
          ) : null}
        </View>

        <Button label={busy ? 'Preparing the file…' : 'Download CSV'} onPress={download} loading={busy} disabled={busy} testID="export-download" />
        {done ? (
          <Banner kind="success" title="Downloaded" testID="export-done">
            {`${done.fileName}: ${plural(done.rows, 'row', 'rows')} under the header, ${sizeText(done.bytes)}.`}
          </Banner>
        ) : null}
        {failure ? (
          <Banner kind="error" title="The file could not be made" testID="export-error">
            {failure.message}
          </Banner>
        ) : null}
      </View>
    </Card>
  );
}

type SheetAsk = { skaterId: string; week: string };

function SheetPicker({
  skaters,
  skaterId,
  timeZone,
  last,
  onOpen,
}: ReviewSectionProps & { last: SheetAsk | null; onOpen: (ask: SheetAsk) => void }) {
  const live = skaters.filter((s) => !s.retired);
  const first = last?.skaterId ?? skaterId;
  const [who, setWho] = useState<string | null>(first && live.some((s) => s.id === first) ? first : null);
  const [week, setWeek] = useState(() => last?.week ?? weekOf(Date.now(), timeZone));
  const [tried, setTried] = useState(false);

  const weekOk = isIsoWeek(week.trim());
  const weekError = tried && !weekOk ? 'Write the week like 2026-W05 (a week that exists).' : null;
  const whoError = tried && !who ? 'Pick the skater the sheet is for.' : null;

  return (
    <Card>
      <View style={styles.stack} testID="sheet-picker">
        <Heading level={2}>Print a weekly sheet</Heading>
        <Text tone="muted">
          One page for one skater and one week: their cues with needs-work and good counts, the notes shared with them (never private
          ones) and their runs. For a skater without a phone.
        </Text>
        <ChoiceChips<string>
          label="Skater"
          choices={live.map((s) => ({ value: s.id, label: s.displayName, testID: `sheet-skater-${s.id}` }))}
          value={who}
          onChange={setWho}
          error={whoError}
          testID="sheet-skater"
        />
        <TextField
          label="Week"
          hint={weekOk ? `ISO week, YYYY-Www: ${weekSpanText(week.trim())}` : 'ISO week, YYYY-Www'}
          value={week}
          onChangeText={setWeek}
          error={weekError}
          autoCapitalize="characters"
          autoCorrect={false}
          testID="sheet-week"
        />
        <Button
          label="Open the sheet"
          onPress={() => {
            setTried(true);
            if (who && weekOk) onOpen({ skaterId: who, week: week.trim() });
          }}
          testID="sheet-open"
        />
      </View>
    </Card>
  );
}

export function ExportSection(props: ReviewSectionProps) {
  const [sheet, setSheet] = useState<SheetAsk | null>(null);
  const [last, setLast] = useState<SheetAsk | null>(null);
  return (
    <>
      {/* The sheet takes the section's whole width, as it will on paper; the form stays mounted under it (hidden), keeping what was typed. */}
      {sheet ? <WeeklySheetView teamId={props.teamId} skaterId={sheet.skaterId} week={sheet.week} onClose={() => setSheet(null)} /> : null}
      <View style={[styles.section, props.wide && styles.sectionWide, sheet && styles.hidden]} testID="export-section">
        <View style={props.wide ? styles.half : undefined}>
          <ExportForm {...props} />
        </View>
        <View style={props.wide ? styles.half : undefined}>
          <SheetPicker
            {...props}
            last={last}
            onOpen={(ask) => {
              setLast(ask);
              setSheet(ask);
            }}
          />
        </View>
      </View>
    </>
  );
}

const styles = StyleSheet.create({
  section: { gap: spacing.md },
  sectionWide: { flexDirection: 'row', alignItems: 'flex-start' },
  half: { flex: 1, minWidth: 0 },
  stack: { gap: spacing.sm },
  fieldsRow: { flexDirection: 'row', gap: spacing.md },
  field: { flex: 1 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  quiet: { alignSelf: 'flex-start' },
  hidden: { display: 'none' },
});
