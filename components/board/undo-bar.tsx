/**
 * The undo bar: it says what was just noted (cue, skaters, mark by shape and word), offers Undo,
 * and "Add note" opens a short text box for the note(s) just made. It also carries the board's
 * prompts ("Pick a skater first") and errors, so every tap gets a visible answer in the same place.
 * Wide screens dock it under the panes; the phone gives it a fixed slot between the tiles and the
 * cues (`compact`), so it covers nothing and nothing moves when it comes and goes.
 *
 * After Undo the bar keeps its place and says "Undone" with the button switched off: a gloved
 * second tap lands on that, never on an older note.
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { Mark } from '../../shared/schemas';
import { Button, MarkShape, Text, ToggleRow, colors, marks, radius, spacing } from '../ui';
import { markKind } from './format';
import { NoteField, noteTooLong } from './note-field';
import type { Notice } from './use-recorder';

export type UndoBarProps = {
  latest: { key: string; cueLabel: string; names: string; mark: Mark; repeat: number; count: number; undone?: boolean } | null;
  notice: Notice | null;
  currentNote: string;
  /** Whether the note just made is shared with its skater (the team's default until changed here). */
  currentShared: boolean;
  onUndo: () => void;
  onSaveNote: (note: string, shared: boolean) => void;
  onEditing: (editing: boolean) => void;
  /** Wide screens: Add note sits beside Undo on one line. */
  wide?: boolean;
  /** The phone's slot: one row, Note and Undo beside the words, no border of its own. */
  compact?: boolean;
};

export function UndoBar({ latest, notice, currentNote, currentShared, onUndo, onSaveNote, onEditing, wide = false, compact = false }: UndoBarProps) {
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState('');
  const [shared, setShared] = useState(false);
  const latestKey = latest?.key ?? null;

  // A new tap (or the bar closing) ends any half-written note for the previous one.
  useEffect(() => {
    setEditing(false);
  }, [latestKey]);
  useEffect(() => onEditing(editing), [editing, onEditing]);

  if (!latest && !notice) return null;

  // After an undo the bar itself says "Undone"; the notice would only repeat it.
  const shownNotice = latest?.undone && notice?.kind === 'undone' ? null : notice;
  const noticeLine = shownNotice ? (
    <Text
      testID={`board-notice-${shownNotice.kind}`}
      accessibilityRole={shownNotice.kind === 'error' || shownNotice.kind === 'prompt' ? 'alert' : undefined}
      aria-live="assertive"
      weight="bold"
      numberOfLines={compact ? 2 : undefined}
      tone={shownNotice.kind === 'error' ? 'error' : 'default'}
      style={shownNotice.kind === 'prompt' ? styles.prompt : undefined}
    >
      {shownNotice.kind === 'error' || shownNotice.kind === 'prompt' ? '\u26A0 ' : ''}
      {shownNotice.text}
    </Text>
  ) : null;

  if (!latest) {
    return (
      <View style={[styles.bar, compact && styles.barCompact, notice?.kind === 'prompt' && styles.barPrompt]} testID="board-notice">
        {noticeLine}
      </View>
    );
  }

  const undone = !!latest.undone;
  const addNote = (
    <Button
      label={currentNote ? 'Edit note' : compact ? 'Note' : 'Add note'}
      variant={wide || compact ? 'secondary' : 'quiet'}
      style={wide || compact ? styles.sideButton : styles.addNote}
      onPress={() => {
        setDraft(currentNote);
        setShared(currentShared);
        setEditing(true);
      }}
      testID="note-add"
    />
  );
  const kind = markKind(latest.mark);
  const mark = marks[kind];
  const heading = undone ? 'Undone' : latest.repeat > 1 ? `Noted again \u00D7${latest.repeat}` : 'Noted';
  const beside = wide || compact;
  return (
    <View
      style={[styles.bar, compact && styles.barCompact, undone && styles.barUndone]}
      testID="undo-bar"
      aria-live="polite"
    >
      {noticeLine}
      <View style={styles.row}>
        <View style={[styles.markBox, compact && styles.markBoxCompact, undone ? styles.markBoxUndone : { backgroundColor: mark.surface, borderColor: mark.strong }]}>
          {undone ? (
            <Text weight="bold" align="center">
              {'\u21B6'}
            </Text>
          ) : (
            <MarkShape kind={kind} size={22} />
          )}
        </View>
        <View style={styles.words}>
          <Text
            variant="caption"
            weight="bold"
            numberOfLines={1}
            testID="undo-bar-title"
            style={[compact && styles.tight, undone ? undefined : { color: mark.ink }]}
          >
            {undone ? `${heading} \u00B7 nothing kept` : `${heading} \u00B7 ${mark.word}`}
          </Text>
          <Text
            weight="bold"
            variant={compact ? 'caption' : 'body'}
            numberOfLines={compact ? 2 : wide ? 2 : 3}
            testID="undo-bar-text"
            style={[compact && styles.tight, undone && styles.struck]}
          >
            {latest.cueLabel}
            <Text tone="muted" variant={compact ? 'caption' : 'body'} style={compact ? styles.tight : undefined}>{` \u2014 ${latest.names}`}</Text>
          </Text>
        </View>
        {beside && !editing && !undone ? addNote : null}
        {undone ? (
          <Button
            label="Undone"
            variant="secondary"
            style={compact ? styles.sideButton : undefined}
            disabled
            testID="undo-button"
            accessibilityLabel={`Already undone: ${latest.cueLabel} for ${latest.names}`}
          />
        ) : (
          <Button
            label="Undo"
            variant="secondary"
            style={compact ? styles.sideButton : undefined}
            onPress={onUndo}
            testID="undo-button"
            accessibilityLabel={`Undo: ${latest.cueLabel} for ${latest.names}`}
          />
        )}
      </View>
      {editing && !undone ? (
        <View style={styles.noteBox}>
          <NoteField
            value={draft}
            onChange={setDraft}
            testID="note-input"
            label={latest.count > 1 ? `Note for all ${latest.count} skaters` : 'Note'}
            autoFocus
          />
          <ToggleRow
            label={latest.count > 1 ? 'Share note with these skaters' : 'Share note with the skater'}
            hint="The cue and its mark always reach the skater; the note only when this is on."
            value={shared}
            onChange={setShared}
            testID="note-shared"
          />
          <View style={styles.row}>
            <Button
              label="Save note"
              onPress={() => {
                onSaveNote(draft.trim(), shared);
                setEditing(false);
              }}
              disabled={noteTooLong(draft)}
              testID="note-save"
            />
            <Button label="Cancel" variant="quiet" onPress={() => setEditing(false)} testID="note-cancel" />
          </View>
        </View>
      ) : beside || undone ? null : (
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
  barCompact: { borderTopWidth: 0, borderWidth: 2, borderColor: colors.primary, borderRadius: radius.md, paddingVertical: 0, paddingHorizontal: spacing.xs, flex: 1, justifyContent: 'center' },
  markBoxCompact: { width: 28, height: 28 },
  tight: { fontSize: 15, lineHeight: 18 },
  barUndone: { borderColor: colors.border, borderTopColor: colors.border, backgroundColor: colors.surfaceSunken },
  barPrompt: { borderTopColor: colors.error, borderColor: colors.error, backgroundColor: colors.errorSurface },
  prompt: { color: colors.error },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  markBox: { width: 40, height: 40, borderRadius: radius.md, borderWidth: 2, alignItems: 'center', justifyContent: 'center' },
  markBoxUndone: { borderColor: colors.border, backgroundColor: colors.surface },
  struck: { textDecorationLine: 'line-through' },
  sideButton: { paddingHorizontal: spacing.sm, paddingVertical: spacing.xxs, minWidth: 64 },
  words: { flex: 1 },
  addNote: { alignSelf: 'flex-start' },
  noteBox: { gap: spacing.xs },
});
