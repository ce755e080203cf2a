/**
 * One note on the skater's page: the cue in large type, its mark (shape + word), who wrote it
 * ("from Coach Anouk"), the coach's note when it is shared, the time, and "Got it", which turns
 * into a plain "Acknowledged" line. "Got it" is the skater's alone: a guardian sees whether the
 * skater has read it, and a plain read-only line instead of the button.
 */
import { StyleSheet, View } from 'react-native';

import { coachShortName } from '../../shared/authors';
import type { SkaterNote } from '../../store/today';
import { Button, MarkBadge, Text, colors, radius, spacing, tapTarget } from '../ui';
import { clockTime, cueText, markKind, sharedNote } from './format';

export interface NoteCardProps {
  note: SkaterNote;
  onAcknowledge: (id: string) => void;
  /** A guardian reads along: no "Got it" (only the skater acknowledges). */
  guardian?: boolean;
}

export function NoteCard({ note, onAcknowledge, guardian = false }: NoteCardProps) {
  const text = sharedNote(note);
  const cue = cueText(note);
  const author = coachShortName(note.authorName);
  return (
    <View style={styles.card} testID={`note-${note.id}`}>
      <Text variant="title" weight="bold" testID={`note-cue-${note.id}`}>
        {cue}
      </Text>
      <View style={styles.meta}>
        <MarkBadge kind={markKind(note)} testID={`note-mark-${note.id}`} />
        <Text tone="muted" accessibilityLabel={`Noted at ${clockTime(note.createdAt)}`}>
          {clockTime(note.createdAt)}
        </Text>
        {author ? (
          <Text tone="muted" testID={`note-author-${note.id}`}>
            from {author}
          </Text>
        ) : null}
      </View>
      {text ? (
        <View style={styles.note} testID={`note-text-${note.id}`}>
          <Text variant="caption" weight="bold" tone="muted">
            Coach’s note
          </Text>
          <Text variant="bodyLarge">{text}</Text>
        </View>
      ) : null}
      {note.acknowledgedAt ? (
        <View
          style={styles.acked}
          testID={`acked-${note.id}`}
          accessibilityLabel={`Acknowledged at ${clockTime(note.acknowledgedAt)}`}
        >
          <Text weight="bold" style={styles.ackedInk} accessibilityElementsHidden importantForAccessibility="no">
            {'\u2713'}
          </Text>
          <Text weight="bold" style={styles.ackedInk}>
            Acknowledged
          </Text>
          <Text style={styles.ackedInk}>{clockTime(note.acknowledgedAt)}</Text>
        </View>
      ) : guardian ? (
        <View style={styles.readOnly} testID={`read-only-${note.id}`}>
          <Text weight="bold">Not yet read by the skater</Text>
          <Text tone="muted" variant="caption">
            Read only: only the skater can say they got it.
          </Text>
        </View>
      ) : (
        <Button
          label="Got it"
          variant="secondary"
          testID={`ack-${note.id}`}
          accessibilityLabel={`Got it: ${cue}`}
          accessibilityHint="Tells your coaches you read this cue"
          onPress={() => onAcknowledge(note.id)}
          style={styles.ack}
        />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderColor: colors.divider,
    borderWidth: 1,
    borderRadius: radius.lg,
    padding: spacing.md,
    gap: spacing.sm,
  },
  meta: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  note: {
    borderLeftWidth: 4,
    borderLeftColor: colors.primary,
    paddingLeft: spacing.sm,
    gap: 2,
  },
  ack: { alignSelf: 'stretch' },
  acked: {
    minHeight: tapTarget,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
    backgroundColor: colors.successSurface,
    borderWidth: 2,
    borderColor: colors.success,
  },
  ackedInk: { color: colors.success },
  readOnly: {
    minHeight: tapTarget,
    justifyContent: 'center',
    gap: 2,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xs,
    borderRadius: radius.md,
    borderWidth: 1,
    borderStyle: 'dashed',
    borderColor: colors.border,
  },
});
