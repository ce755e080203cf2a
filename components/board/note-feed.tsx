/**
 * Today's notes, newest first. Tap a note to fix it (mark, note text, whether the skater may read
 * the note); Delete asks once more in place before it removes. Cue labels come from the whole
 * library, archived cues included, so old notes keep their words.
 */
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import type { Cue, Mark, Observation, ObservationPatch, Skater } from '../../shared/schemas';
import { Button, MarkBadge, MarkShape, Text, ToggleRow, colors, marks, radius, spacing, tapTarget } from '../ui';
import { formatTime, markKind } from './format';
import { NoteField, noteTooLong } from './note-field';

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

  if (observations.length === 0) {
    return (
      <Text tone="muted" testID="feed-empty">
        No notes yet today. Tap a skater, then a cue: each tap lands here at once.
      </Text>
    );
  }

  return (
    <View style={styles.list} testID="feed" accessibilityRole="list">
      {observations.map((o) => {
        const skater = skaters.get(o.skaterId)?.displayName ?? 'Skater no longer in the squad';
        const cue = cues.get(o.cueId);
        const label = cue ? `${cue.label}${cue.archived ? ' (archived)' : ''}` : 'Cue not on this device';
        const open = openId === o.id;
        const confirming = confirmId === o.id;
        return (
          <View key={o.id} style={[styles.item, open && styles.itemOpen]} testID={`feed-item-${o.id}`}>
            <View style={styles.itemRow}>
              <Pressable
                testID={`feed-open-${o.id}`}
                accessibilityRole="button"
                accessibilityLabel={`${skater}, ${label}, ${marks[markKind(o.mark)].word}, ${formatTime(o.createdAt)}. Edit`}
                accessibilityState={{ expanded: open }}
                onPress={() => {
                  setOpenId(open ? null : o.id);
                  setConfirmId(null);
                }}
                style={({ pressed }) => [styles.itemMain, pressed && styles.pressed]}
              >
                <View style={styles.itemHead}>
                  <Text weight="bold" style={styles.grow} numberOfLines={1}>
                    {skater}
                  </Text>
                  <Text numeric variant="bodyLarge" tone="muted">
                    {formatTime(o.createdAt)}
                  </Text>
                </View>
                <Text>{label}</Text>
                <View style={styles.itemHead}>
                  <MarkBadge kind={markKind(o.mark)} testID={`feed-mark-${o.id}`} />
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
              {confirming ? null : (
                <Button
                  label="Delete"
                  variant="quiet"
                  onPress={() => setConfirmId(o.id)}
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
                <Button
                  label="Yes, delete"
                  onPress={() => {
                    setConfirmId(null);
                    if (openId === o.id) setOpenId(null);
                    onDelete(o.id);
                  }}
                  testID={`feed-delete-confirm-${o.id}`}
                />
                <Button label="Keep" variant="secondary" onPress={() => setConfirmId(null)} testID={`feed-delete-cancel-${o.id}`} />
              </View>
            ) : null}
            {open ? (
              <EditPanel
                key={o.id}
                observation={o}
                onCancel={() => setOpenId(null)}
                onSave={(patch) => {
                  onSave(o.id, patch);
                  setOpenId(null);
                }}
              />
            ) : null}
          </View>
        );
      })}
    </View>
  );
}

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
