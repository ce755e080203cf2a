/**
 * The cue library, for the head coach: add a cue to a phase, rename, move up or down within its
 * phase, archive and bring back. Archived cues leave the chips but keep their history (old notes
 * still show their words). Every change is saved on this device and sent with the rest.
 */
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { cueLabelSchema, duplicateCueMessage, findDuplicateCueLabel, phaseLabels, phases, type Phase } from '../../shared/cues';
import type { Cue } from '../../shared/schemas';
import { useEditCue } from '../../store/board';
import { Banner, Button, Card, ChoiceChips, Heading, Text, TextField, colors, radius, spacing } from '../ui';

const labelError = (text: string) => {
  const result = cueLabelSchema.safeParse(text);
  return result.success ? null : (result.error.issues[0]?.message ?? 'Check the cue text');
};

/**
 * Why a label is refused in a phase: its form, or a cue of that phase (archived ones too) already
 * worded the same, in the words the server uses when it refuses such a push.
 */
const labelProblem = (cues: readonly Cue[], phase: Phase, text: string, exceptId?: string) => {
  const twin = findDuplicateCueLabel(cues, phase, text, exceptId);
  return labelError(text) ?? (twin ? duplicateCueMessage(twin) : null);
};

export function CueLibrary({ teamId, cues, onClose }: { teamId: string; cues: Cue[]; onClose: () => void }) {
  const edit = useEditCue(teamId);
  const [phase, setPhase] = useState<Phase>('straight');
  const [text, setText] = useState('');
  const [addError, setAddError] = useState<string | null>(null);
  const [renaming, setRenaming] = useState<{ id: string; text: string; error: string | null } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [failure, setFailure] = useState<string | null>(null);

  // One change at a time: a second tap while the first is being saved does nothing (a gloved
  // double tap on "Add cue" adds one cue, on "Move up" moves once).
  const inFlight = useRef(false);
  const run = async (change: Parameters<typeof edit.mutateAsync>[0], confirmation: string) => {
    if (inFlight.current) return false;
    inFlight.current = true;
    setFailure(null);
    try {
      await edit.mutateAsync(change);
      setDone(confirmation);
      return true;
    } catch (e) {
      setFailure(e instanceof Error ? e.message : String(e));
      setDone(null);
      return false;
    } finally {
      inFlight.current = false;
    }
  };

  const add = async () => {
    const problem = labelProblem(cues, phase, text);
    setAddError(problem);
    if (problem) return;
    if (await run({ kind: 'add', phase, label: text.trim() }, `Added “${text.trim()}” to ${phaseLabels[phase]}.`)) setText('');
  };

  const saveRename = async () => {
    if (!renaming) return;
    const renamed = cues.find((c) => c.id === renaming.id);
    const problem = renamed ? labelProblem(cues, renamed.phase, renaming.text, renamed.id) : labelError(renaming.text);
    if (problem) return setRenaming({ ...renaming, error: problem });
    if (await run({ kind: 'rename', id: renaming.id, label: renaming.text.trim() }, `Renamed to “${renaming.text.trim()}”.`)) setRenaming(null);
  };

  return (
    <View style={styles.wrap} testID="cue-library">
      <View style={styles.head}>
        <Heading level={2} style={styles.grow}>
          Cue library
        </Heading>
        <Button label="Back to the board" variant="secondary" onPress={onClose} testID="cue-library-close" />
      </View>
      <Text tone="muted">Changes reach every coach’s board with the next sync. Archived cues keep their notes.</Text>
      {failure ? (
        <Banner kind="error" testID="cue-library-error">
          {failure}
        </Banner>
      ) : done ? (
        <Banner kind="success" testID="cue-library-done">
          {done}
        </Banner>
      ) : null}

      <Card testID="cue-add">
        <Text weight="bold" variant="bodyLarge">
          Add a cue
        </Text>
        <ChoiceChips
          label="Phase"
          choices={phases.map((p) => ({ value: p, label: phaseLabels[p], testID: `cue-add-phase-${p}` }))}
          value={phase}
          onChange={(next) => {
            setPhase(next);
            // The same words may be free in the other phase.
            if (addError) setAddError(labelProblem(cues, next, text));
          }}
        />
        <TextField
          label="Cue text (2 to 60 characters)"
          value={text}
          onChangeText={(t) => {
            setText(t);
            if (addError) setAddError(labelProblem(cues, phase, t));
          }}
          onSubmitEditing={() => void add()}
          error={addError}
          hint={`${text.trim().length} / 60`}
          testID="cue-add-input"
        />
        <Button label="Add cue" onPress={() => void add()} loading={edit.isPending && !renaming} testID="cue-add-save" style={styles.start} />
      </Card>

      {phases.map((p) => {
        const inPhase = cues.filter((c) => c.phase === p);
        const live = inPhase.filter((c) => !c.archived).sort((a, b) => a.sortOrder - b.sortOrder || a.label.localeCompare(b.label));
        const archived = inPhase.filter((c) => c.archived).sort((a, b) => a.label.localeCompare(b.label));
        return (
          <Card key={p} testID={`cue-library-${p}`} style={styles.phaseCard}>
            <Text weight="bold" variant="bodyLarge" accessibilityRole="header">
              {phaseLabels[p]}
            </Text>
            {live.length === 0 ? <Text tone="muted">No cues in this phase.</Text> : null}
            {live.map((cue, index) =>
              renaming?.id === cue.id ? (
                <View key={cue.id} style={styles.renameBox}>
                  <TextField
                    label={`Rename “${cue.label}”`}
                    value={renaming.text}
                    onChangeText={(t) =>
                      setRenaming({ ...renaming, text: t, error: renaming.error ? labelProblem(cues, cue.phase, t, cue.id) : null })
                    }
                    onSubmitEditing={() => void saveRename()}
                    error={renaming.error}
                    autoFocus
                    testID={`cue-rename-input-${cue.id}`}
                  />
                  <View style={styles.actions}>
                    <Button label="Save" onPress={() => void saveRename()} testID={`cue-rename-save-${cue.id}`} />
                    <Button label="Cancel" variant="quiet" onPress={() => setRenaming(null)} testID={`cue-rename-cancel-${cue.id}`} />
                  </View>
                </View>
              ) : (
                <View key={cue.id} style={styles.row} testID={`cue-row-${cue.id}`}>
                  <Text style={styles.label}>{cue.label}</Text>
                  <View style={styles.actions}>
                    <Button
                      label="Up"
                      variant="secondary"
                      disabled={index === 0}
                      onPress={() => void run({ kind: 'move', id: cue.id, direction: 'up' }, `Moved “${cue.label}” up.`)}
                      accessibilityLabel={`Move “${cue.label}” up`}
                      testID={`cue-up-${cue.id}`}
                    />
                    <Button
                      label="Down"
                      variant="secondary"
                      disabled={index === live.length - 1}
                      onPress={() => void run({ kind: 'move', id: cue.id, direction: 'down' }, `Moved “${cue.label}” down.`)}
                      accessibilityLabel={`Move “${cue.label}” down`}
                      testID={`cue-down-${cue.id}`}
                    />
                    <Button
                      label="Rename"
                      variant="quiet"
                      onPress={() => setRenaming({ id: cue.id, text: cue.label, error: null })}
                      accessibilityLabel={`Rename “${cue.label}”`}
                      testID={`cue-rename-${cue.id}`}
                    />
                    <Button
                      label="Archive"
                      variant="quiet"
                      onPress={() => void run({ kind: 'archive', id: cue.id, archived: true }, `Archived “${cue.label}”. Its notes stay.`)}
                      accessibilityLabel={`Archive “${cue.label}”`}
                      testID={`cue-archive-${cue.id}`}
                    />
                  </View>
                </View>
              ),
            )}
            {archived.length > 0 ? (
              <View style={styles.archived}>
                <Text variant="caption" weight="bold" tone="muted">
                  ARCHIVED
                </Text>
                {archived.map((cue) => (
                  <View key={cue.id} style={styles.row} testID={`cue-row-${cue.id}`}>
                    <Text tone="muted" style={styles.label}>
                      {cue.label}
                    </Text>
                    <Button
                      label="Bring back"
                      variant="secondary"
                      onPress={() => void run({ kind: 'archive', id: cue.id, archived: false }, `“${cue.label}” is back on the board.`)}
                      accessibilityLabel={`Bring back “${cue.label}”`}
                      testID={`cue-unarchive-${cue.id}`}
                    />
                  </View>
                ))}
              </View>
            ) : null}
          </Card>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.md },
  head: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  grow: { flex: 1 },
  start: { alignSelf: 'flex-start' },
  phaseCard: { padding: spacing.md, gap: spacing.xs },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.xs,
    paddingVertical: spacing.xxs,
    borderBottomWidth: 1,
    borderBottomColor: colors.divider,
  },
  label: { flexGrow: 1, flexBasis: 180 },
  actions: { flexDirection: 'row', gap: spacing.xxs, flexWrap: 'wrap' },
  renameBox: { gap: spacing.xs, padding: spacing.sm, borderRadius: radius.md, backgroundColor: colors.surfaceSunken },
  archived: { gap: spacing.xxs, paddingTop: spacing.xs },
});
