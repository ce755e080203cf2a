/**
 * A skater's target for a distance, with its pace plan: even pace, even pace after a set opener
 * (a standing start is slower per metre than what follows), or a share of the time per section.
 * The planned split at every crossing is shown as the coach types, so the plan can be checked
 * before it is saved. The head coach and the coaches set targets; they sync like everything else.
 *
 * One published 1500 m profile is offered as an example of shares, with its source: Wiersma et
 * al. 2017 give the elite junior men's 0–300 m, 300–700 m and 700–1100 m shares of final time in
 * their abstract (22.1, 24.6, 26.2 %); the last lap is the remainder (27.1 %), not a figure they
 * give. shared/timing.ts holds the numbers and the reference.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { targetPlanProblem } from '../../shared/schemas/clock';
import { PUBLISHED_1500_PROFILE, formatRaceTime, paceSchedule, parseRaceTime, type Track } from '../../shared/timing';
import { Banner, Button, ChoiceChips, Heading, Text, TextField, colors, fonts, radius, spacing } from '../ui';
import { distanceLabel, layoutFor, sectionName, trackLabel, type ClockTarget } from './clock-math';

export type TargetSave = {
  skaterId: string;
  track: Track;
  distanceM: number;
  targetMs: number;
  plan: 'even' | 'shares';
  openerMs: number | null;
  sharesPct: number[] | null;
  note?: string;
};

type PlanChoice = 'even' | 'opener' | 'shares';

const parseTime = (text: string): number | null => {
  try {
    const ms = parseRaceTime(text);
    return ms > 0 ? ms : null;
  } catch {
    return null;
  }
};

export function TargetEditor({
  skaterId,
  skaterName,
  distanceM,
  track,
  existing,
  onSave,
  onClose,
}: {
  skaterId: string;
  skaterName: string;
  distanceM: number;
  track: Track;
  existing?: ClockTarget;
  onSave: (target: TargetSave) => Promise<unknown>;
  onClose: () => void;
}) {
  const layout = useMemo(() => layoutFor(distanceM, track), [distanceM, track]);
  const sections = layout.splitsAtM.length;
  const [timeText, setTimeText] = useState(existing ? formatRaceTime(existing.targetMs) : '');
  const [plan, setPlan] = useState<PlanChoice>(existing?.plan === 'shares' ? 'shares' : existing?.openerMs ? 'opener' : 'even');
  const [openerText, setOpenerText] = useState(existing?.openerMs ? formatRaceTime(existing.openerMs) : '');
  const [shares, setShares] = useState<string[]>(() =>
    existing?.sharesPct && existing.sharesPct.length === sections
      ? existing.sharesPct.map(String)
      : Array.from({ length: sections }, () => ''),
  );
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const targetMs = parseTime(timeText);
  const openerMs = plan === 'opener' ? parseTime(openerText) : null;
  const sharesPct = plan === 'shares' ? shares.map((s) => Number(s.replace(',', '.'))) : null;
  const sharesSum = sharesPct ? sharesPct.reduce((a, b) => a + (Number.isFinite(b) ? b : 0), 0) : 0;
  const canUseExample = distanceM === PUBLISHED_1500_PROFILE.distanceM && track === PUBLISHED_1500_PROFILE.track;

  const draft: TargetSave | null =
    targetMs === null
      ? null
      : {
          skaterId,
          track,
          distanceM,
          targetMs,
          plan: plan === 'shares' ? 'shares' : 'even',
          openerMs: plan === 'opener' ? openerMs : null,
          sharesPct: plan === 'shares' ? sharesPct : null,
        };
  const problem = !draft
    ? timeText.trim()
      ? 'Write the target time like 1:58.40 or 38.90.'
      : null
    : plan === 'opener' && openerMs === null
      ? openerText.trim()
        ? 'Write the opener time like 26.80.'
        : 'Give the opener time, or choose even pace.'
      : targetPlanProblem(draft);
  const preview = useMemo(() => {
    if (!draft || problem) return null;
    try {
      return paceSchedule(distanceM, draft.targetMs, {
        track,
        ...(draft.openerMs ? { openerMs: draft.openerMs } : {}),
        ...(draft.sharesPct ? { sharesPct: draft.sharesPct } : {}),
      });
    } catch {
      return null;
    }
  }, [draft, problem, distanceM, track]);

  const save = async () => {
    if (!draft) return setError('Give the target time first.');
    if (problem) return setError(problem);
    setBusy(true);
    try {
      await onSave(draft);
      onClose();
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
      setBusy(false);
    }
  };

  return (
    <View style={styles.wrap} testID="target-editor" role="group" aria-label={`Target for ${skaterName}`}>
      <Heading level={3}>{`Target for ${skaterName}: ${distanceLabel(distanceM)}, ${trackLabel(track).toLowerCase()}`}</Heading>
      <TextField
        label="Target time"
        value={timeText}
        onChangeText={(t) => {
          setTimeText(t);
          setError(null);
        }}
        hint="Like 1:58.40"
        testID="target-time"
        inputMode="decimal"
        autoCorrect={false}
      />
      <ChoiceChips<PlanChoice>
        label="Pace plan"
        value={plan}
        onChange={(p) => {
          setPlan(p);
          setError(null);
        }}
        choices={[
          { value: 'even', label: 'Even pace', testID: 'target-plan-even' },
          { value: 'opener', label: 'Even after an opener', testID: 'target-plan-opener' },
          { value: 'shares', label: 'Section shares', testID: 'target-plan-shares' },
        ]}
        testID="target-plan"
      />
      {plan === 'opener' ? (
        <TextField
          label={layout.openerM > 0 ? `Opener time (first ${layout.openerM} m)` : 'First lap time (standing start)'}
          value={openerText}
          onChangeText={(t) => {
            setOpenerText(t);
            setError(null);
          }}
          hint="The rest of the target is shared out evenly per metre."
          testID="target-opener"
          inputMode="decimal"
          autoCorrect={false}
        />
      ) : null}
      {plan === 'shares' ? (
        <View style={styles.shares}>
          <Text weight="bold">Share of the target per section (%)</Text>
          {canUseExample ? (
            <View style={styles.example}>
              <Button
                label="Use the example profile"
                variant="secondary"
                testID="target-shares-example"
                onPress={() => setShares(PUBLISHED_1500_PROFILE.sharesPct.map(String))}
              />
              <Text variant="caption" tone="muted" testID="target-shares-source">
                Example: elite junior men, 1500 m (Wiersma et al. 2017, Int J Sports Physiol Perform 12(9):1224–1231): 22.1 %,
                24.6 % and 26.2 % for 0–300, 300–700 and 700–1100 m as published; the last lap is the remainder, 27.1 %. An
                example, not a plan for every skater.
              </Text>
            </View>
          ) : null}
          <View style={styles.shareGrid}>
            {shares.map((value, i) => (
              <View key={i} style={styles.shareCell}>
                <TextField
                  label={`${sectionName(i, layout)} (to ${Math.round(layout.splitsAtM[i])} m)`}
                  value={value}
                  onChangeText={(t) => {
                    setShares((old) => old.map((o, j) => (j === i ? t : o)));
                    setError(null);
                  }}
                  testID={`target-share-${i}`}
                  inputMode="decimal"
                  autoCorrect={false}
                />
              </View>
            ))}
          </View>
          <Text testID="target-shares-sum" weight="bold">{`Sum: ${Math.round(sharesSum * 100) / 100} % (must be 100)`}</Text>
        </View>
      ) : null}

      {preview ? (
        <View testID="target-preview" style={styles.preview} role="list" aria-label="Planned splits">
          {preview.map((p, i) => (
            <View key={i} role="listitem" style={styles.previewItem}>
              <Text variant="caption" tone="muted">
                {`${Math.round(p.atM)} m`}
              </Text>
              <Text style={styles.previewFigure}>{formatRaceTime(p.cumulativeMs)}</Text>
            </View>
          ))}
        </View>
      ) : null}
      {error || (problem && timeText.trim()) ? (
        <Banner kind="error" testID="target-error">
          {error ?? problem ?? ''}
        </Banner>
      ) : null}
      <View style={styles.actions}>
        <Button label="Save target" testID="target-save" loading={busy} onPress={() => void save()} />
        <Button label="Cancel" variant="secondary" testID="target-cancel" onPress={onClose} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, borderWidth: 2, borderColor: colors.primary, backgroundColor: colors.surface },
  shares: { gap: spacing.sm },
  example: { gap: spacing.xs },
  shareGrid: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  shareCell: { width: 150 },
  preview: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  previewItem: { alignItems: 'flex-start' },
  previewFigure: { fontFamily: fonts.numbers, fontSize: 24, lineHeight: 28, color: colors.ink },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
