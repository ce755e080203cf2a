/**
 * One note in the Tidy-up list: skater, cue, mark, the words and who wrote it; for a note this
 * person may change (their own, or any for the head coach), a Fix panel to change the mark, the
 * cue, the skater it is about, the evening's longer words and whether the skater may read them,
 * and a Delete that asks first (a second tap on the same spot confirms one note, never two).
 */
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { coachShortName } from '../../../shared/authors';
import { phaseLabels, phases, type Phase } from '../../../shared/cues';
import type { Cue, Mark, Observation } from '../../../shared/schemas';
import type { Skater } from '../../../shared/schemas/team';
import type { NoteFix } from '../../../sync';
import { NoteField, noteTooLong } from '../../board/note-field';
import { Button, ChoiceChips, MarkBadge, Text, ToggleRow, colors, spacing } from '../../ui';

export type NoteChange = { kind: 'fix'; fix: NoteFix } | { kind: 'delete' };

export function TidyNote({
  note,
  skaterName,
  cue,
  cues,
  skaters,
  canChange,
  busy,
  onChange,
}: {
  note: Observation;
  skaterName: string;
  cue: Cue | undefined;
  /** The live cue library (archived ones left out of the picker). */
  cues: readonly Cue[];
  /** Skaters on the board (the move picker). */
  skaters: readonly Skater[];
  canChange: boolean;
  busy: boolean;
  /** Resolves once written on the device (rejects with the store's reason). */
  onChange: (change: NoteChange) => Promise<unknown>;
}) {
  const [open, setOpen] = useState(false);
  const [confirming, setConfirming] = useState(false);
  // A gloved double tap lands twice on the confirm: only the first one deletes.
  const deleting = useRef(false);
  const author = coachShortName(note.authorName) || 'A coach';
  const id = note.id;
  return (
    <View role="listitem" style={styles.note} testID={`tidy-note-${id}`}>
      <View style={styles.head}>
        <MarkBadge kind={note.mark === 'good' ? 'good' : 'needsWork'} testID={`tidy-note-mark-${id}`} />
        <Text weight="bold" testID={`tidy-note-skater-${id}`}>
          {skaterName}
        </Text>
        <Text testID={`tidy-note-cue-${id}`}>{cue ? `${cue.label} (${phaseLabels[cue.phase]})` : 'A cue no longer in the library'}</Text>
      </View>
      {note.note ? (
        <Text testID={`tidy-note-text-${id}`}>{note.note}</Text>
      ) : (
        <Text tone="muted" testID={`tidy-note-text-${id}`}>
          (no words, just the mark)
        </Text>
      )}
      <Text tone="muted" variant="caption" testID={`tidy-note-author-${id}`}>
        {`By ${author}${note.noteShared ? ' · shared with the skater' : ' · coaches only'}`}
      </Text>
      {!canChange ? (
        <Text tone="muted" variant="caption" testID={`tidy-note-readonly-${id}`}>
          {`Read only: ${author} wrote this note, so only they or the head coach can change it.`}
        </Text>
      ) : open ? (
        <NoteFixPanel
          note={note}
          cues={cues}
          skaters={skaters}
          busy={busy}
          onCancel={() => setOpen(false)}
          onSave={async (fix) => {
            await onChange({ kind: 'fix', fix });
            setOpen(false);
          }}
        />
      ) : confirming ? (
        <View style={styles.row} testID={`tidy-note-confirm-${id}`}>
          <Text weight="bold">Delete this note?</Text>
          <Button
            label="Delete note"
            disabled={busy}
            testID={`tidy-note-delete-yes-${id}`}
            onPress={() => {
              if (deleting.current) return;
              deleting.current = true;
              setConfirming(false);
              void onChange({ kind: 'delete' })
                .catch(() => undefined)
                .finally(() => {
                  deleting.current = false;
                });
            }}
          />
          <Button label="Keep it" variant="secondary" testID={`tidy-note-delete-no-${id}`} onPress={() => setConfirming(false)} />
        </View>
      ) : (
        <View style={styles.row}>
          <Button label="Fix" variant="secondary" disabled={busy} testID={`tidy-note-fix-${id}`} accessibilityLabel={`Fix the note on ${skaterName}`} onPress={() => setOpen(true)} />
          <Button label="Delete…" variant="quiet" disabled={busy} testID={`tidy-note-delete-${id}`} accessibilityLabel={`Delete the note on ${skaterName}`} onPress={() => setConfirming(true)} />
        </View>
      )}
    </View>
  );
}

function NoteFixPanel({
  note,
  cues,
  skaters,
  busy,
  onSave,
  onCancel,
}: {
  note: Observation;
  cues: readonly Cue[];
  skaters: readonly Skater[];
  busy: boolean;
  onSave: (fix: NoteFix) => Promise<void>;
  onCancel: () => void;
}) {
  const id = note.id;
  const current = cues.find((c) => c.id === note.cueId);
  const [mark, setMark] = useState<Mark>(note.mark);
  const [phase, setPhase] = useState<Phase>(current?.phase ?? 'start');
  const [cueId, setCueId] = useState(note.cueId);
  const [skaterId, setSkaterId] = useState(note.skaterId);
  const [text, setText] = useState(note.note);
  const [shared, setShared] = useState(note.noteShared);
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const phaseCues = cues.filter((c) => c.phase === phase && (!c.archived || c.id === note.cueId));
  const pickable = skaters;

  const save = async () => {
    if (saving || busy) return;
    if (noteTooLong(text)) return;
    setSaving(true);
    setError(null);
    try {
      await onSave({ mark, cueId, skaterId, note: text, noteShared: shared });
    } catch (cause) {
      setError(cause instanceof Error ? cause.message : 'The change could not be saved on this device.');
    } finally {
      setSaving(false);
    }
  };

  return (
    <View style={styles.panel} testID={`tidy-fix-${id}`}>
      <ChoiceChips<Mark>
        label="Mark"
        choices={[
          { value: 'needs_work', label: 'Needs work', testID: `tidy-fix-mark-nw-${id}` },
          { value: 'good', label: 'Good', testID: `tidy-fix-mark-good-${id}` },
        ]}
        value={mark}
        onChange={setMark}
      />
      <ChoiceChips<Phase>
        label="Cue: phase"
        choices={phases.map((p) => ({ value: p, label: phaseLabels[p], testID: `tidy-fix-phase-${p}-${id}` }))}
        value={phase}
        onChange={setPhase}
      />
      <ChoiceChips<string>
        label="Cue"
        choices={phaseCues.map((c) => ({ value: c.id, label: c.label, testID: `tidy-fix-cue-${c.id}-${id}` }))}
        value={phaseCues.some((c) => c.id === cueId) ? cueId : null}
        onChange={setCueId}
      />
      <ChoiceChips<string>
        label="Skater (move the note)"
        choices={pickable.map((s) => ({ value: s.id, label: s.displayName, testID: `tidy-fix-skater-${s.id}-${id}` }))}
        value={pickable.some((s) => s.id === skaterId) ? skaterId : null}
        onChange={setSkaterId}
      />
      {skaterId !== note.skaterId ? (
        <Text tone="muted" variant="caption" testID={`tidy-fix-move-hint-${id}`}>
          The note moves to this skater: it leaves the other skater&apos;s page with the next sync, and any &quot;got it&quot; is cleared.
        </Text>
      ) : null}
      <NoteField value={text} onChange={setText} label="Note (the evening's longer words)" testID={`tidy-fix-text-${id}`} />
      <ToggleRow label="The skater may read this note" value={shared} onChange={setShared} testID={`tidy-fix-shared-${id}`} />
      {error ? (
        <Text tone="error" weight="bold" role="alert" testID={`tidy-fix-error-${id}`}>
          {error}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Save" loading={saving} disabled={busy || noteTooLong(text)} onPress={() => void save()} testID={`tidy-fix-save-${id}`} />
        <Button label="Cancel" variant="secondary" disabled={saving} onPress={onCancel} testID={`tidy-fix-cancel-${id}`} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  note: { gap: spacing.xs, paddingVertical: spacing.sm, borderBottomWidth: 1, borderBottomColor: colors.divider },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  panel: { gap: spacing.sm, padding: spacing.sm, backgroundColor: colors.surfaceSunken, borderRadius: 8 },
});
