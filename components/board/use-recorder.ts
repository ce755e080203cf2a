/**
 * The board's recording loop: a tap on a chip records one note per picked skater at once
 * (optimistic, no await), and remembers that tap for the undo bar. The bar names one tap and
 * undoes exactly that tap, once: after Undo it says "Undone" in the same place (no older note
 * moves under the thumb, so a gloved double tap on Undo removes one tap's notes, never two taps').
 * It stays for UNDO_MS after the tap (and while the coach is typing a note), and goes as soon as
 * the coach changes the pick: it never offers to undo an older note while the next skaters are
 * being picked.
 *
 * A second tap on the same zone of the same chip for the same skaters within REPEAT_GUARD_MS is
 * the same tap (a glove bouncing on glass), not a second note; a deliberate tap later still is
 * ("Noted again ×2").
 *
 * The tap and the notice live in a small store of this board's own (not React state of the board
 * screen): a tap then re-renders only what shows them (the undo bar), never the whole board.
 * `tap`, `undo`, `say`, `setHold` and `dismiss` keep their identity for the board's lifetime, so
 * memoised chips and bars are not re-rendered for new callbacks.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { createStore, type StoreApi } from 'zustand';

import type { Mark } from '../../shared/schemas';
import { newObservationIds, useRecordObservations, useRemoveObservations } from '../../store/board';
import { useBoardUi } from '../../store/board-ui';

export const UNDO_MS = 8000;
const NOTICE_MS = 4000;
/** Two taps on the same zone for the same skaters closer than this are one tap. */
export const REPEAT_GUARD_MS = 400;

export type Recording = {
  ids: string[];
  cueId: string;
  mark: Mark;
  skaterIds: string[];
  repeat: number;
  at: number;
  /** Set once Undo removed this tap's notes: the bar then says so and offers nothing more. */
  undone?: boolean;
};
export type Notice = { kind: 'prompt' | 'undone' | 'error' | 'saved'; text: string };
export type RecorderState = { latest: Recording | null; notice: Notice | null; hold: boolean };
export type RecorderStore = StoreApi<RecorderState>;

const sameSet = (a: readonly string[], b: readonly string[]) => a.length === b.length && a.every((x) => b.includes(x));

/** The tap the undo bar is about, or null. */
export const latestOf = (s: RecorderState): Recording | null => s.latest;

export function useRecorder(teamId: string, sessionId: string | undefined, describe: (r: Recording) => string) {
  const record = useRecordObservations();
  const remove = useRemoveObservations();
  const [store] = useState<RecorderStore>(() => createStore<RecorderState>()(() => ({ latest: null, notice: null, hold: false })));

  // What the stable callbacks below read at call time.
  const current = useRef({ teamId, sessionId, describe, record, remove });
  current.current = { teamId, sessionId, describe, record, remove };

  // Timers: the bar closes UNDO_MS after its tap (NOTICE_MS after an undo; not while a note is
  // being written), a notice other than an error fades after NOTICE_MS.
  useEffect(() => {
    let undoTimer: ReturnType<typeof setTimeout> | undefined;
    let noticeTimer: ReturnType<typeof setTimeout> | undefined;
    const unsubscribe = store.subscribe((now, before) => {
      if (now.latest !== before.latest || now.hold !== before.hold) {
        clearTimeout(undoTimer);
        if (now.latest && !now.hold) {
          undoTimer = setTimeout(() => store.setState({ latest: null }), now.latest.undone ? NOTICE_MS : UNDO_MS);
        }
      }
      if (now.notice !== before.notice) {
        clearTimeout(noticeTimer);
        if (now.notice && now.notice.kind !== 'error') noticeTimer = setTimeout(() => store.setState({ notice: null }), NOTICE_MS);
      }
    });
    return () => {
      unsubscribe();
      clearTimeout(undoTimer);
      clearTimeout(noticeTimer);
    };
  }, [store]);

  // A new pick starts the next note: the bar stops offering the previous one (it stays in the
  // feed, where it can still be fixed or deleted). A bar being written into stays.
  useEffect(
    () =>
      useBoardUi.subscribe((now, before) => {
        if (now.selected === before.selected) return;
        const s = store.getState();
        if (s.latest && !s.hold) store.setState({ latest: null, notice: s.notice?.kind === 'error' ? s.notice : null });
      }),
    [store],
  );

  // A write the device refused: the optimistic note is already rolled back; say why, and drop
  // the tap from the bar so Undo cannot point at a note that never existed.
  const failedIds = record.isError ? record.variables?.ids : undefined;
  useEffect(() => {
    if (!failedIds || !record.error) return;
    store.setState((s) => ({
      latest: s.latest?.ids[0] === failedIds[0] ? null : s.latest,
      notice: { kind: 'error', text: `Not saved: ${record.error!.message}` },
    }));
  }, [failedIds, record.error, store]);

  useEffect(() => {
    if (remove.isError && remove.error) store.setState({ notice: { kind: 'error', text: `Could not undo: ${remove.error.message}` } });
  }, [remove.isError, remove.error, store]);

  const tap = useCallback(
    (cueId: string, mark: Mark, skaterIds: string[]) => {
      const { teamId, sessionId, record } = current.current;
      if (skaterIds.length === 0) {
        store.setState({ notice: { kind: 'prompt', text: 'Pick a skater first: tap a tile, then the cue.' } });
        return;
      }
      if (!sessionId) return;
      const now = Date.now();
      const top = store.getState().latest;
      const again = !!top && !top.undone && top.cueId === cueId && top.mark === mark && sameSet(top.skaterIds, skaterIds);
      // A bounce, not a decision: the first tap's note stands alone.
      if (again && now - top.at < REPEAT_GUARD_MS) return;
      const ids = newObservationIds(skaterIds.length);
      // mutate, not mutateAsync: the feed paints in this frame; the device commits after.
      record.mutate({ teamId, sessionId, skaterIds, cueId, mark, ids });
      store.setState({ notice: null, latest: { ids, cueId, mark, skaterIds, repeat: again ? top.repeat + 1 : 1, at: now } });
    },
    [store],
  );

  const undo = useCallback(() => {
    const { sessionId, remove, describe } = current.current;
    const top = store.getState().latest;
    // Only the tap the bar names, and only once: a second tap on Undo finds it already undone.
    if (!top || top.undone || !sessionId) return;
    remove.mutate({ sessionId, ids: top.ids });
    store.setState({ latest: { ...top, undone: true }, hold: false, notice: { kind: 'undone', text: `Removed: ${describe(top)}` } });
  }, [store]);

  const setHold = useCallback((hold: boolean) => store.setState({ hold }), [store]);
  const say = useCallback((notice: Notice | null) => store.setState({ notice }), [store]);

  return useMemo(() => ({ store, tap, undo, setHold, say }), [store, tap, undo, setHold, say]);
}
