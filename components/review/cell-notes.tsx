/**
 * The notes behind one cell (a skater, a cue, a week), newest first: the day in the team's zone,
 * the coach, the mark (shape + word) and the note's text. Beside the table on a wide screen,
 * under it on a phone. Its author and the head coach change a note
 * in place (the others read it, with a word why).
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { mayChangeNote } from '../../shared/authors';
import { cellNotesQuery } from '../../store/review';
import { useActiveMembership, useSession } from '../../store/session';
import { Banner, Button, Card, Heading, MarkBadge, Text, colors, spacing } from '../ui';
import { longDay, weekSpanText } from './format';
import { NoteEditor } from './note-editor';

export type CellSelection = { skaterId: string; skaterName: string; cueId: string; cueLabel: string; week: string };

export function CellNotes({ teamId, cell, onClose }: { teamId: string; cell: CellSelection; onClose: () => void }) {
  const notes = useQuery(cellNotesQuery(teamId, cell.skaterId, cell.cueId, cell.week));
  const [editing, setEditing] = useState<string | null>(null);
  const [message, setMessage] = useState('');
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;
  let body;
  if (notes.isPending) body = <Text tone="muted" role="status">Loading the notes…</Text>;
  else if (notes.isError && !notes.data)
    body = (
      <View style={styles.stack}>
        <Banner kind="error" testID="review-notes-error">
          {notes.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" testID="review-notes-retry" onPress={() => void notes.refetch()} />
      </View>
    );
  else if (notes.data.notes.length === 0)
    body = (
      <Text tone="muted" testID="review-notes-empty">
        No notes here any more: they may have been deleted since the counts were loaded.
      </Text>
    );
  else
    body = (
      <View style={styles.stack} role="list" aria-label={`Notes: ${cell.skaterName}, ${cell.cueLabel}, week ${cell.week}`}>
        {notes.data.notes.map((note) => (
          <View key={note.id} role="listitem" style={styles.note} testID={`review-note-${note.id}`}>
            <View style={styles.noteHead}>
              <MarkBadge kind={note.mark === 'good' ? 'good' : 'needsWork'} testID={`review-note-mark-${note.id}`} />
              <Text weight="bold" testID={`review-note-day-${note.id}`}>
                {longDay(note.day)}
              </Text>
            </View>
            <Text tone="muted" variant="caption" testID={`review-note-author-${note.id}`}>
              {`By ${note.authorName}${note.noteShared ? ' · shared with the skater' : ' · coaches only'}`}
            </Text>
            {note.note ? (
              <Text testID={`review-note-text-${note.id}`}>{note.note}</Text>
            ) : (
              <Text tone="muted" testID={`review-note-text-${note.id}`}>
                (no words, just the mark)
              </Text>
            )}
            {editing === note.id ? (
              <NoteEditor
                teamId={teamId}
                note={note}
                onDone={(said) => {
                  setEditing(null);
                  setMessage(said);
                }}
              />
            ) : mayChangeNote(note, userId, role) ? (
              <Button
                label="Change this note"
                variant="quiet"
                accessibilityLabel={`Change this note (${longDay(note.day)}, by ${note.authorName})`}
                onPress={() => {
                  setEditing(note.id);
                  setMessage('');
                }}
                testID={`review-note-change-${note.id}`}
                style={styles.change}
              />
            ) : (
              <Text variant="caption" tone="muted" testID={`review-note-readonly-${note.id}`}>
                Only its author or the head coach can change this note.
              </Text>
            )}
          </View>
        ))}
      </View>
    );
  return (
    <Card testID="review-notes">
      <View style={styles.head}>
        <View style={styles.title}>
          <Heading level={2} testID="review-notes-title">
            {`${cell.skaterName}: ${cell.cueLabel}`}
          </Heading>
          <Text tone="muted">{`Week ${cell.week} (${weekSpanText(cell.week)})`}</Text>
        </View>
        <Button label="Close" variant="secondary" testID="review-notes-close" onPress={onClose} />
      </View>
      {message ? (
        <Banner kind="success" testID="review-notes-saved">
          {message}
        </Banner>
      ) : null}
      {body}
      <Text variant="caption" tone="muted" testID="review-notes-edit-line">
        A change made here goes out with sync, like one on the Board. Deleting a note, or moving it to another skater or session, is done in Tidy-up.
      </Text>
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { flexDirection: 'row', gap: spacing.sm, alignItems: 'flex-start', justifyContent: 'space-between' },
  title: { flex: 1, gap: spacing.xxs },
  stack: { gap: spacing.sm },
  note: { gap: spacing.xxs, paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.divider },
  change: { alignSelf: 'flex-start' },
  noteHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
});
