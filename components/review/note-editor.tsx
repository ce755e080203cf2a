/**
 * Changing one note from the evening review, in place: its mark, its words and whether the skater
 * may read it. The change goes through the board's own device-store mutation (the outbox and sync,
 * like a change on the Board), then a sync run sends it and the review's counts are asked again.
 * The device refuses what this person may not change (another coach's note) and says why.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { Mark } from '../../shared/schemas';
import { useUpdateObservation } from '../../store/board';
import { reviewKeys } from '../../store/review';
import { runSync } from '../../store/sync-status';
import { Button, ChoiceChips, Text, ToggleRow, spacing } from '../ui';
import { NoteField } from '../board/note-field';

export type EditableNote = { id: string; sessionId: string; mark: Mark; note: string; noteShared: boolean };

export function NoteEditor({ teamId, note, onDone }: { teamId: string; note: EditableNote; onDone: (message: string) => void }) {
  const client = useQueryClient();
  const update = useUpdateObservation();
  const [mark, setMark] = useState<Mark>(note.mark);
  const [text, setText] = useState(note.note);
  const [shared, setShared] = useState(note.noteShared);
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);

  const save = async () => {
    if (saving) return;
    setSaving(true);
    setError(null);
    try {
      await update.mutateAsync({ sessionId: note.sessionId, id: note.id, patch: { mark, note: text, noteShared: shared } });
    } catch (cause) {
      setSaving(false);
      setError(cause instanceof Error ? cause.message : 'The change could not be saved on this device.');
      return;
    }
    const result = await runSync(teamId).catch(() => null);
    await client.invalidateQueries({ queryKey: reviewKeys.team(teamId) });
    setSaving(false);
    onDone(
      result === null
        ? 'Saved on this device. It is sent with the next sync; the counts change once the server has it.'
        : 'Saved and sent. The counts below are the server\u2019s new ones.',
    );
  };

  return (
    <View style={styles.wrap} testID={`review-edit-${note.id}`}>
      <ChoiceChips<Mark>
        label="Mark"
        choices={[
          { value: 'needs_work', label: 'Needs work', testID: `review-edit-mark-nw-${note.id}` },
          { value: 'good', label: 'Good', testID: `review-edit-mark-good-${note.id}` },
        ]}
        value={mark}
        onChange={setMark}
      />
      <NoteField value={text} onChange={setText} testID={`review-edit-text-${note.id}`} />
      <ToggleRow label="The skater may read this note" value={shared} onChange={setShared} testID={`review-edit-shared-${note.id}`} />
      {error ? (
        <Text tone="error" weight="bold" testID={`review-edit-error-${note.id}`}>
          {error}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Save" loading={saving} onPress={() => void save()} testID={`review-edit-save-${note.id}`} />
        <Button label="Cancel" variant="secondary" disabled={saving} onPress={() => onDone('')} testID={`review-edit-cancel-${note.id}`} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
