/**
 * Today's notes, newest first. Tap a note to fix it (mark, note text, whether the skater may read
 * the note); Delete asks once more in place before it removes. Cue labels come from the whole
 * library, archived cues included, so old notes keep their words.
 *
 * Built for a tap every few hundred ms: the newest FEED_PAGE notes are shown ("Show more" adds the
 * next ones), and each note is a memoised item whose props are its observation object (kept by the
 * optimistic update) and plain strings, so a new note mounts one item and re-renders no other.
 */
import { memo, useCallback, useRef, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { coachShortName, mayChangeNote } from '../../shared/authors';
import type { Cue, Mark, Observation, ObservationPatch, Skater } from '../../shared/schemas';
import { useActiveMembership, useSession } from '../../store/session';
import { Button, MarkBadge, MarkShape, Text, ToggleRow, colors, marks, radius, spacing, tapTarget } from '../ui';
import { formatTime, markKind } from './format';
import { NoteField, noteTooLong } from './note-field';

/** Notes shown at first, and added by each "Show more". */
export const FEED_PAGE = 50;

export type NoteFeedProps = {
  observations: Observation[];
  skaters: Map<string, Skater>;
  cues: Map<string, Cue>;
  onSave: (id: string, patch: ObservationPatch) => void;
  onDelete: (id: string) => void;
};

export function NoteFeed({ observations, skaters, cues, onSave, onDelete }: NoteFeedProps) {
  const [openId, setOpenId] = useState<string | null>(null);
  const [confirmId, setConfirmId] = useState<string | null>(null);
  const [limit, setLimit] = useState(FEED_PAGE);
  // The items' callbacks keep their identity; they reach the latest handlers through this.
  const handlers = useRef({ onSave, onDelete });
  handlers.current = { onSave, onDelete };

  const toggleOpen = useCallback((id: string) => {
    setOpenId((current) => (current === id ? null : id));
    setConfirmId(null);
  }, []);
  const askDelete = useCallback((id: string) => setConfirmId(id), []);
  const keep = useCallback(() => setConfirmId(null), []);
  const confirmDelete = useCallback((id: string) => {
    setConfirmId(null);
    setOpenId((current) => (current === id ? null : current));
    handlers.current.onDelete(id);
  }, []);
  const save = useCallback((id: string, patch: ObservationPatch) => {
    handlers.current.onSave(id, patch);
    setOpenId(null);
  }, []);
  const cancelEdit = useCallback(() => setOpenId(null), []);
  // A coach changes their own notes, the head coach any: the others are shown read-only.
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;

  if (observations.length === 0) {
    return (
      <Text tone="muted" testID="feed-empty">
        No notes yet today. Tap a skater, then a cue: each tap lands here at once.
      </Text>
    );
  }

  const shown = observations.length > limit ? observations.slice(0, limit) : observations;
  const more = observations.length - shown.length;
  return (
    <View style={styles.list}>
      <View style={styles.list} testID="feed" role="list">
      {shown.map((o) => {
        const cue = cues.get(o.cueId);
        return (
          <View key={o.id} role="listitem">
          <FeedItem
            observation={o}
            skater={skaters.get(o.skaterId)?.displayName ?? 'Skater no longer in the squad'}
            label={cue ? `${cue.label}${cue.archived ? ' (archived)' : ''}` : 'Cue not on this device'}
            author={coachShortName(o.authorName)}
            canChange={mayChangeNote(o, userId, role)}
            open={openId === o.id}
            confirming={confirmId === o.id}
            onToggleOpen={toggleOpen}
            onAskDelete={askDelete}
            onKeep={keep}
            onConfirmDelete={confirmDelete}
            onSave={save}
            onCancelEdit={cancelEdit}
          />
          </View>
        );
      })}
      </View>
      {more > 0 ? (
        <Button
          label={`Show ${Math.min(more, FEED_PAGE)} more (${more} older)`}
          variant="secondary"
          onPress={() => setLimit((n) => n + FEED_PAGE)}
          testID="feed-more"
        />
      ) : null}
    </View>
  );
}

type FeedItemProps = {
  observation: Observation;
  skater: string;
  label: string;
  /** "Coach Anouk", or '' for a note from before names were kept. */
  author: string;
  /** Whether this coach may edit and delete the note (its author, or the head coach). */
  canChange: boolean;
  open: boolean;
  confirming: boolean;
  onToggleOpen: (id: string) => void;
  onAskDelete: (id: string) => void;
  onKeep: () => void;
  onConfirmDelete: (id: string) => void;
  onSave: (id: string, patch: ObservationPatch) => void;
  onCancelEdit: () => void;
};

const FeedItem = memo(function FeedItem({
  observation: o,
  skater,
  label,
  author,
  canChange,
  open,
  confirming,
  onToggleOpen,
  onAskDelete,
  onKeep,
  onConfirmDelete,
  onSave,
  onCancelEdit,
}: FeedItemProps) {
  const time = formatTime(o.createdAt);
  return (
    <View style={[styles.item, open && styles.itemOpen]} testID={`feed-item-${o.id}`}>
      <View style={styles.itemRow}>
        <Pressable
          testID={`feed-open-${o.id}`}
          accessibilityRole={canChange ? 'button' : undefined}
          // Named by what it shows (skater, time, cue, mark, author), so what a screen reader says
          // is what a sighted coach reads; the button role and its expanded state say it opens.
          accessibilityState={canChange ? { expanded: open } : undefined}
          disabled={!canChange}
          onPress={() => onToggleOpen(o.id)}
          style={({ pressed }) => [styles.itemMain, pressed && styles.pressed]}
        >
          <View style={styles.itemHead}>
            <Text weight="bold" style={styles.grow} numberOfLines={1}>
              {skater}
            </Text>
            <Text numeric variant="bodyLarge" tone="muted">
              {time}
            </Text>
          </View>
          <Text>{label}</Text>
          {author ? (
            <Text variant="caption" tone="muted" testID={`feed-author-${o.id}`}>
              from {author}
            </Text>
          ) : null}
          <View style={styles.itemHead}>
            <MarkBadge kind={markKind(o.mark)} testID={`feed-mark-${o.id}`} />
            {o.acknowledgedAt ? (
              <Text variant="caption" weight="bold" testID={`feed-acked-${o.id}`}>
                ✓ Seen by skater
              </Text>
            ) : null}
            {o.note ? (
              <Text variant="caption" tone="muted">
                {o.noteShared ? 'Shared with skater' : 'Coaches only'}
              </Text>
            ) : null}
          </View>
          {o.note ? (
            <Text testID={`feed-note-${o.id}`} style={styles.note}>
              {o.note}
            </Text>
          ) : null}
        </Pressable>
        {confirming || !canChange ? null : (
          <Button
            label="Delete"
            variant="quiet"
            onPress={() => onAskDelete(o.id)}
            testID={`feed-delete-${o.id}`}
            accessibilityLabel={`Delete: ${label} for ${skater}`}
          />
        )}
      </View>
      {confirming ? (
        <View style={styles.confirm} testID={`feed-confirm-${o.id}`}>
          <Text weight="bold" style={styles.confirmText}>
            Delete this note?
          </Text>
          <Button label="Yes, delete" onPress={() => onConfirmDelete(o.id)} testID={`feed-delete-confirm-${o.id}`} />
          <Button label="Keep" variant="secondary" onPress={onKeep} testID={`feed-delete-cancel-${o.id}`} />
        </View>
      ) : null}
      {open && canChange ? <EditPanel key={o.id} observation={o} onCancel={onCancelEdit} onSave={(patch) => onSave(o.id, patch)} /> : null}
    </View>
  );
});

function EditPanel({ observation, onSave, onCancel }: { observation: Observation; onSave: (patch: ObservationPatch) => void; onCancel: () => void }) {
  const [mark, setMark] = useState<Mark>(observation.mark);
  const [note, setNote] = useState(observation.note);
  const [shared, setShared] = useState(observation.noteShared);
  const id = observation.id;

  const save = () => {
    const patch: ObservationPatch = {};
    if (mark !== observation.mark) patch.mark = mark;
    if (note.trim() !== observation.note) patch.note = note.trim();
    if (shared !== observation.noteShared) patch.noteShared = shared;
    onSave(patch);
  };

  return (
    <View style={styles.panel} testID={`feed-edit-${id}`}>
      <View style={styles.marks} accessibilityRole="radiogroup" accessibilityLabel="Mark">
        {(['needs_work', 'good'] as const).map((value) => {
          const kind = markKind(value);
          const on = mark === value;
          return (
            <Pressable
              key={value}
              testID={`feed-edit-mark-${value}`}
              accessibilityRole="radio"
              accessibilityLabel={marks[kind].word}
              accessibilityState={{ checked: on, selected: on }}
              onPress={() => setMark(value)}
              style={[
                styles.markOption,
                on && { backgroundColor: marks[kind].surface, borderColor: marks[kind].strong, borderWidth: 3 },
              ]}
            >
              <MarkShape kind={kind} />
              <Text weight={on ? 'bold' : 'regular'} style={on ? { color: marks[kind].ink } : undefined}>
                {on ? '\u2713 ' : ''}
                {marks[kind].word}
              </Text>
            </Pressable>
          );
        })}
      </View>
      <NoteField value={note} onChange={setNote} testID="feed-edit-note" />
      <ToggleRow
        label="Share note with the skater"
        hint="The mark is always shared; the note only when this is on."
        value={shared}
        onChange={setShared}
        testID="feed-edit-shared"
      />
      <View style={styles.actions}>
        <Button label="Save" onPress={save} disabled={noteTooLong(note)} testID="feed-edit-save" />
        <Button label="Cancel" variant="quiet" onPress={onCancel} testID="feed-edit-cancel" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.xs },
  item: { borderRadius: radius.md, borderWidth: 1, borderColor: colors.divider, backgroundColor: colors.surface },
  itemOpen: { borderColor: colors.primary, borderWidth: 2 },
  itemRow: { flexDirection: 'row', alignItems: 'flex-start' },
  itemMain: { flex: 1, padding: spacing.sm, gap: spacing.xxs, minHeight: tapTarget, borderRadius: radius.md },
  pressed: { backgroundColor: colors.surfaceSunken },
  itemHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  grow: { flex: 1 },
  confirmText: { width: '100%' },
  note: { fontStyle: 'italic' },
  confirm: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.xs,
    padding: spacing.sm,
    backgroundColor: colors.errorSurface,
    borderBottomLeftRadius: radius.md,
    borderBottomRightRadius: radius.md,
  },
  panel: { gap: spacing.sm, padding: spacing.sm, borderTopWidth: 1, borderTopColor: colors.divider },
  marks: { flexDirection: 'row', gap: spacing.xs, flexWrap: 'wrap' },
  markOption: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
    minHeight: tapTarget,
    paddingHorizontal: spacing.md,
    borderRadius: radius.pill,
    borderWidth: 2,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  actions: { flexDirection: 'row', gap: spacing.sm, alignItems: 'center' },
});
