/**
 * The undo bar, docked at the bottom of the board where the thumb already is: it says what was
 * just noted (cue, skaters, mark by shape and word), offers Undo, and "Add note" opens a short
 * text box for the note(s) just made. It also carries the board's prompts ("Pick a skater
 * first") and errors, so every tap gets a visible answer in the same place.
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { Mark } from '../../shared/schemas';
import { Button, MarkShape, Text, colors, marks, radius, spacing } from '../ui';
import { markKind } from './format';
import { NoteField, noteTooLong } from './note-field';
import type { Notice } from './use-recorder';

export type UndoBarProps = {
  latest: { key: string; cueLabel: string; names: string; mark: Mark; repeat: number; count: number } | null;
  notice: Notice | null;
  currentNote: string;
  onUndo: () => void;
  onSaveNote: (note: string) => void;
  onEditing: (editing: boolean) => void;
  /** Wide screens: Add note sits beside Undo on one line. */
  wide?: boolean;
};

export function UndoBar({ latest, notice, currentNote, onUndo, onSaveNote, onEditing, wide = false }: UndoBarProps) {
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState('');
  const latestKey = latest?.key ?? null;

  // A new tap (or the bar closing) ends any half-written note for the previous one.
  useEffect(() => {
    setEditing(false);
  }, [latestKey]);
  useEffect(() => onEditing(editing), [editing, onEditing]);

  if (!latest && !notice) return null;

  const noticeLine = notice ? (
    <Text
      testID={`board-notice-${notice.kind}`}
      accessibilityRole={notice.kind === 'error' || notice.kind === 'prompt' ? 'alert' : undefined}
      aria-live="assertive"
      weight="bold"
      tone={notice.kind === 'error' ? 'error' : 'default'}
      style={notice.kind === 'prompt' ? styles.prompt : undefined}
    >
      {notice.kind === 'error' || notice.kind === 'prompt' ? '\u26A0 ' : ''}
      {notice.text}
    </Text>
  ) : null;

  if (!latest) {
    return (
      <View style={[styles.bar, notice?.kind === 'prompt' && styles.barPrompt]} testID="board-notice">
        {noticeLine}
      </View>
    );
  }

  const addNote = (
    <Button
      label={currentNote ? 'Edit note' : 'Add note'}
      variant={wide ? 'secondary' : 'quiet'}
      style={wide ? undefined : styles.addNote}
      onPress={() => {
        setDraft(currentNote);
        setEditing(true);
      }}
      testID="note-add"
    />
  );
  const kind = markKind(latest.mark);
  const mark = marks[kind];
  const heading = latest.repeat > 1 ? `Noted again \u00D7${latest.repeat}` : 'Noted';
  return (
    <View style={styles.bar} testID="undo-bar" accessibilityRole="summary" aria-live="polite">
      {noticeLine}
      <View style={styles.row}>
        <View style={[styles.markBox, { backgroundColor: mark.surface, borderColor: mark.strong }]}>
          <MarkShape kind={kind} size={22} />
        </View>
        <View style={styles.words}>
          <Text variant="caption" weight="bold" testID="undo-bar-title" style={{ color: mark.ink }}>
            {heading} · {mark.word}
          </Text>
          <Text weight="bold" numberOfLines={wide ? 2 : 3} testID="undo-bar-text">
            {latest.cueLabel}
            <Text tone="muted">{` \u2014 ${latest.names}`}</Text>
          </Text>
        </View>
        {wide && !editing ? addNote : null}
        <Button label="Undo" variant="secondary" onPress={onUndo} testID="undo-button" accessibilityLabel={`Undo: ${latest.cueLabel} for ${latest.names}`} />
      </View>
      {editing ? (
        <View style={styles.noteBox}>
          <NoteField
            value={draft}
            onChange={setDraft}
            testID="note-input"
            label={latest.count > 1 ? `Note for all ${latest.count} skaters` : 'Note'}
            autoFocus
          />
          <View style={styles.row}>
            <Button
              label="Save note"
              onPress={() => {
                onSaveNote(draft.trim());
                setEditing(false);
              }}
              disabled={noteTooLong(draft)}
              testID="note-save"
            />
            <Button label="Cancel" variant="quiet" onPress={() => setEditing(false)} testID="note-cancel" />
          </View>
        </View>
      ) : wide ? null : (
        addNote
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  bar: {
    gap: spacing.xs,
    padding: spacing.sm,
    paddingHorizontal: spacing.md,
    backgroundColor: colors.surface,
    borderTopWidth: 3,
    borderTopColor: colors.primary,
    borderRadius: radius.sm,
  },
  barPrompt: { borderTopColor: colors.error, backgroundColor: colors.errorSurface },
  prompt: { color: colors.error },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  markBox: { width: 40, height: 40, borderRadius: radius.md, borderWidth: 2, alignItems: 'center', justifyContent: 'center' },
  words: { flex: 1 },
  addNote: { alignSelf: 'flex-start' },
  noteBox: { gap: spacing.xs },
});
