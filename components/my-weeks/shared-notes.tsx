/**
 * The notes behind one cell of "my weeks", read-only: only notes a coach shared with the skater
 * and that have words (the server already blanks a private note's text; a blank one is not shown
 * as an empty row), each with its day, coach and mark. The rest are counted in one line, so the
 * figures in the table still add up. Nothing here changes a note.
 */
import { useQuery } from '@tanstack/react-query';
import { StyleSheet, View } from 'react-native';

import { cellNotesQuery } from '../../store/review';
import { Banner, Button, Card, Heading, MarkBadge, Text, colors, spacing } from '../ui';
import { longDay, weekSpanText } from '../review/format';

export type MyCell = { skaterId: string; cueId: string; cueLabel: string; week: string };

export function SharedNotes({ teamId, cell, onClose }: { teamId: string; cell: MyCell; onClose: () => void }) {
  const notes = useQuery(cellNotesQuery(teamId, cell.skaterId, cell.cueId, cell.week));
  let body;
  if (notes.isPending) body = <Text tone="muted" role="status">Loading the notes…</Text>;
  else if (notes.isError && !notes.data)
    body = (
      <View style={styles.stack}>
        <Banner kind="error" testID="my-weeks-notes-error">
          {notes.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" onPress={() => void notes.refetch()} testID="my-weeks-notes-retry" />
      </View>
    );
  else {
    const shared = notes.data.notes.filter((n) => n.noteShared && n.note.trim() !== '');
    const others = notes.data.notes.length - shared.length;
    body = (
      <View style={styles.stack}>
        {shared.length === 0 ? (
          <Text tone="muted" testID="my-weeks-notes-none">
            No note was shared with you for this cue that week: only the marks.
          </Text>
        ) : (
          <View role="list" aria-label={`Shared notes: ${cell.cueLabel}, week ${cell.week}`} style={styles.stack}>
            {shared.map((note) => (
              <View key={note.id} role="listitem" style={styles.note} testID={`my-weeks-note-${note.id}`}>
                <View style={styles.noteHead}>
                  <MarkBadge kind={note.mark === 'good' ? 'good' : 'needsWork'} />
                  <Text weight="bold">{longDay(note.day)}</Text>
                </View>
                <Text tone="muted" variant="caption">{`From ${note.authorName}`}</Text>
                <Text testID={`my-weeks-note-text-${note.id}`}>{note.note}</Text>
              </View>
            ))}
          </View>
        )}
        {others > 0 && shared.length > 0 ? (
          <Text variant="caption" tone="muted" testID="my-weeks-notes-others">
            {`And ${others === 1 ? '1 more mark' : `${others} more marks`} without a note shared with you.`}
          </Text>
        ) : null}
      </View>
    );
  }
  return (
    <Card testID="my-weeks-notes">
      <View style={styles.head}>
        <View style={styles.title}>
          <Heading level={2} testID="my-weeks-notes-title">
            {cell.cueLabel}
          </Heading>
          <Text tone="muted">{`Week ${cell.week} (${weekSpanText(cell.week)})`}</Text>
        </View>
        <Button label="Close" variant="secondary" onPress={onClose} testID="my-weeks-notes-close" />
      </View>
      {body}
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { flexDirection: 'row', gap: spacing.sm, alignItems: 'flex-start', justifyContent: 'space-between' },
  title: { flex: 1, gap: spacing.xxs },
  stack: { gap: spacing.sm },
  note: { gap: spacing.xxs, paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.divider },
  noteHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
});
