/**
 * One note on the skater's page: the cue in large type, its mark (shape + word), the coach's note
 * when it is shared, the time, and "Got it", which turns into a plain "Acknowledged" line.
 */
import { StyleSheet, View } from 'react-native';

import type { SkaterNote } from '../../store/today';
import { Button, MarkBadge, Text, colors, radius, spacing, tapTarget } from '../ui';
import { clockTime, cueText, markKind, sharedNote } from './format';

export interface NoteCardProps {
  note: SkaterNote;
  onAcknowledge: (id: string) => void;
  /** A guardian acknowledges on the skater's behalf: the button says so to screen readers. */
  guardian?: boolean;
}

export function NoteCard({ note, onAcknowledge, guardian = false }: NoteCardProps) {
  const text = sharedNote(note);
  const cue = cueText(note);
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
      ) : (
        <Button
          label="Got it"
          variant="secondary"
          testID={`ack-${note.id}`}
          accessibilityLabel={`Got it: ${cue}`}
          accessibilityHint={guardian ? 'Tells the coaches this cue was read (as guardian)' : 'Tells your coaches you read this cue'}
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
});
