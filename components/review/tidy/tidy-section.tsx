/**
 * The evening review's Tidy-up (issue #10 §4): the team's sessions by day, newest first, read from
 * this device (coaches hold the whole team's sessions and notes, so it works offline), and beside
 * them (stacked on a phone) the picked session's notes. A coach fixes a mis-tap (mark, cue,
 * delete), moves a note to another skater, adds the evening's longer words and the shared switch,
 * and merges two sessions of one day or of neighbouring days (the emptied one is left, hidden). Every change is written on the device with its outbox entry
 * (store/tidy.ts) and goes with the next sync, like a tap on the board; a sync is started at once.
 */
import { useQuery } from '@tanstack/react-query';
import { useMemo, useRef, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { coachShortName, mayChangeNote } from '../../../shared/authors';
import { cuesOnDevice } from '../../../store/board';
import { useActiveMembership, useSession } from '../../../store/session';
import { runSync } from '../../../store/sync-status';
import { mayMergeSessions, mergeKeeps, useTidyChange, useTidySessions } from '../../../store/tidy';
import type { TidySession } from '../../../sync';
import { formatDay } from '../../board/format';
import { Banner, Button, Card, Heading, Text, colors, plural, spacing, tapTarget } from '../../ui';
import type { ReviewSectionProps } from '../section-props';
import { TidyNote, type NoteChange } from './tidy-note';

/** "Anouk's session"/title/rink: what names a session in the list. */
function sessionName(session: TidySession): string {
  const parts = [session.title.trim(), session.rink.trim()].filter(Boolean);
  return parts.length > 0 ? parts.join(' · ') : 'Session';
}

/** Who made the session: "you", a coach named by one of their notes, or "a coach". */
function madeBy(session: TidySession, userId: string): string {
  if (session.createdBy === userId) return 'you';
  const theirs = session.notes.find((n) => n.createdBy === session.createdBy && n.authorName);
  return coachShortName(theirs?.authorName) || 'another coach';
}

export function TidySection({ teamId, skaters, wide }: ReviewSectionProps) {
  const sessions = useTidySessions(teamId);
  const cues = useQuery(cuesOnDevice(teamId)).data ?? [];
  const change = useTidyChange(teamId);
  const userId = useSession((s) => s.user?.id ?? '');
  const role = useActiveMembership()?.role;
  const [picked, setPicked] = useState<string | null>(null);
  const [message, setMessage] = useState<{ kind: 'success' | 'error'; text: string } | null>(null);
  const [merging, setMerging] = useState<string | null>(null);
  // A second tap (a gloved double tap) before the first merge settles does nothing.
  const mergeRunning = useRef(false);

  const list = useMemo(() => sessions.data ?? [], [sessions.data]);
  const current = list.find((s) => s.id === picked) ?? list[0] ?? null;
  const names = useMemo(() => new Map(skaters.map((s) => [s.id, s.displayName])), [skaters]);
  const onBoard = useMemo(() => skaters.filter((s) => !s.retired), [skaters]);
  const cueById = useMemo(() => new Map(cues.map((c) => [c.id, c])), [cues]);

  const apply = async <T,>(run: () => Promise<T>, done: string): Promise<T> => {
    setMessage(null);
    let result: T;
    try {
      result = await run();
    } catch (cause) {
      const text = cause instanceof Error ? cause.message : 'The change could not be saved on this device.';
      setMessage({ kind: 'error', text });
      throw cause;
    }
    setMessage({ kind: 'success', text: `${done} Saved on this device; it is sent with the sync.` });
    void runSync(teamId).catch(() => undefined);
    return result;
  };

  const onNote = (noteId: string) => (c: NoteChange) =>
    apply(
      () => change.mutateAsync(c.kind === 'delete' ? { kind: 'delete', id: noteId } : { kind: 'fix', id: noteId, fix: c.fix }),
      c.kind === 'delete' ? 'Note deleted.' : 'Note changed.',
    );

  if (sessions.isPending) return <Text tone="muted" role="status">Reading the sessions on this device…</Text>;
  if (sessions.isError) {
    return (
      <Banner kind="error" testID="tidy-error">
        {sessions.error.message}
      </Banner>
    );
  }
  if (list.length === 0) {
    return (
      <Text tone="muted" testID="tidy-empty">
        No sessions on this device yet. Notes taken on the board show up here, day by day.
      </Text>
    );
  }

  const sameDay = current ? list.filter((s) => mayMergeSessions(current, s)) : [];
  /** A session named in the merge question (with its day when the two days differ). */
  const mergeName = (s: TidySession, other: TidySession) => `“${sessionName(s)}”${s.day === other.day ? '' : ` (${formatDay(s.day)})`}`;

  const dayList = (
    <View role="list" aria-label="Sessions by day, newest first" style={styles.days} testID="tidy-sessions">
      {list.map((s) => {
        const on = current?.id === s.id;
        return (
          <Pressable
            key={s.id}
            role="listitem"
            accessibilityRole="button"
            accessibilityState={{ selected: on }}
            accessibilityLabel={`${formatDay(s.day)}, ${sessionName(s)}, made by ${madeBy(s, userId)}, ${plural(s.notes.length, 'note', 'notes')}`}
            onPress={() => {
              setPicked(s.id);
              setMerging(null);
            }}
            style={[styles.day, on && styles.dayOn]}
            testID={`tidy-session-${s.id}`}
          >
            <Text weight="bold">{formatDay(s.day)}</Text>
            <Text>{sessionName(s)}</Text>
            <Text tone="muted" variant="caption">
              {`Made by ${madeBy(s, userId)} · ${plural(s.notes.length, 'note', 'notes')}`}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );

  const pane = current ? (
    <Card style={styles.pane} testID="tidy-pane">
      <Heading level={2} testID="tidy-pane-title">
        {`${formatDay(current.day)} · ${sessionName(current)}`}
      </Heading>
      <Text tone="muted" testID="tidy-pane-meta">
        {`Made by ${madeBy(current, userId)} · ${plural(current.notes.length, 'note', 'notes')}`}
      </Text>
      {message ? (
        <Banner kind={message.kind} testID={`tidy-message-${message.kind}`}>
          {message.text}
        </Banner>
      ) : null}
      {sameDay.length > 0 ? (
        <View style={styles.merge} testID="tidy-merge">
          <Text>Another session of this day or the day beside it (two coaches on either side of the ice, or a session that ran past midnight):</Text>
          {sameDay.map((other) => {
            const { kept, emptied } = mergeKeeps(current, other);
            return merging === other.id ? (
              <View key={other.id} style={styles.row} testID={`tidy-merge-confirm-${other.id}`}>
                <Text weight="bold" testID={`tidy-merge-question-${other.id}`}>
                  {`Merge these two sessions? The notes of ${mergeName(emptied, kept)} move into ${mergeName(kept, emptied)}; ${mergeName(emptied, kept)} is left empty.`}
                </Text>
                <Button
                  label="Merge"
                  disabled={change.isPending}
                  testID={`tidy-merge-yes-${other.id}`}
                  onPress={() => {
                    if (mergeRunning.current) return;
                    mergeRunning.current = true;
                    setMerging(null);
                    void apply(() => change.mutateAsync({ kind: 'merge', a: current.id, b: other.id }), 'Sessions merged.')
                      // Show the session that is left, with every note.
                      .then((left) => setPicked(left))
                      .catch(() => undefined)
                      .finally(() => {
                        mergeRunning.current = false;
                      });
                  }}
                />
                <Button label="Keep both" variant="secondary" testID={`tidy-merge-no-${other.id}`} onPress={() => setMerging(null)} />
              </View>
            ) : (
              <Button
                key={other.id}
                label={`Merge with ${sessionName(other)} (${plural(other.notes.length, 'note', 'notes')})`}
                variant="secondary"
                disabled={change.isPending}
                testID={`tidy-merge-${other.id}`}
                onPress={() => setMerging(other.id)}
              />
            );
          })}
        </View>
      ) : null}
      {current.notes.length === 0 ? (
        <Text tone="muted" testID="tidy-pane-empty">
          No notes in this session.
        </Text>
      ) : (
        <View role="list" aria-label={`Notes of ${formatDay(current.day)}`}>
          {current.notes.map((note) => (
            <TidyNote
              key={note.id}
              note={note}
              skaterName={names.get(note.skaterId) ?? 'A skater no longer in the squad'}
              cue={cueById.get(note.cueId)}
              cues={cues}
              skaters={onBoard}
              canChange={mayChangeNote(note, userId, role)}
              busy={change.isPending}
              onChange={onNote(note.id)}
            />
          ))}
        </View>
      )}
    </Card>
  ) : null;

  return (
    <View style={[styles.wrap, wide && styles.wide]} testID="tidy-section">
      <View style={wide ? styles.rail : undefined}>{dayList}</View>
      <View style={styles.main}>{pane}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.md },
  wide: { flexDirection: 'row', alignItems: 'flex-start' },
  rail: { width: 340 },
  main: { flex: 1, minWidth: 0 },
  days: { gap: spacing.xs },
  day: {
    minHeight: tapTarget,
    padding: spacing.sm,
    borderRadius: 8,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
    gap: spacing.xxs,
  },
  dayOn: { backgroundColor: colors.surfaceSunken, borderColor: colors.primary, borderWidth: 2 },
  pane: { gap: spacing.sm },
  merge: { gap: spacing.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
});
