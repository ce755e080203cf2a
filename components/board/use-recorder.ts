/**
 * The board's recording loop: a tap on a chip records one note per picked skater at once
 * (optimistic, no await), and keeps a short stack of recent taps for the undo bar. Every tap is
 * its own entry, so a double tap shows "Noted again ×2" and each can be undone in turn; the bar
 * stays for UNDO_MS after the latest change, and while the coach is typing a note.
 *
 * The stack and the notice live in a small store of this board's own (not React state of the
 * board screen): a tap then re-renders only what shows them (the undo bar), never the whole board.
 * `tap`, `undo`, `say` and `setHold` keep their identity for the board's lifetime, so memoised
 * chips and bars are not re-rendered for new callbacks.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { createStore, type StoreApi } from 'zustand';

import type { Mark } from '../../shared/schemas';
import { newObservationIds, useRecordObservations, useRemoveObservations } from '../../store/board';

export const UNDO_MS = 8000;
const NOTICE_MS = 4000;

export type Recording = { ids: string[]; cueId: string; mark: Mark; skaterIds: string[]; repeat: number; at: number };
export type Notice = { kind: 'prompt' | 'undone' | 'error' | 'saved'; text: string };
export type RecorderState = { stack: Recording[]; notice: Notice | null; hold: boolean };
export type RecorderStore = StoreApi<RecorderState>;

const sameSet = (a: readonly string[], b: readonly string[]) => a.length === b.length && a.every((x) => b.includes(x));

/** The tap the undo bar is about (the newest), or null. */
export const latestOf = (s: RecorderState): Recording | null => s.stack[s.stack.length - 1] ?? null;

export function useRecorder(teamId: string, sessionId: string | undefined, describe: (r: Recording) => string) {
  const record = useRecordObservations();
  const remove = useRemoveObservations();
  const [store] = useState<RecorderStore>(() => createStore<RecorderState>()(() => ({ stack: [], notice: null, hold: false })));

  // What the stable callbacks below read at call time.
  const current = useRef({ teamId, sessionId, describe, record, remove });
  current.current = { teamId, sessionId, describe, record, remove };

  // Timers: the undo stack empties UNDO_MS after its last change (not while a note is being
  // written), a notice other than an error fades after NOTICE_MS.
  useEffect(() => {
    let undoTimer: ReturnType<typeof setTimeout> | undefined;
    let noticeTimer: ReturnType<typeof setTimeout> | undefined;
    const unsubscribe = store.subscribe((now, before) => {
      if (now.stack !== before.stack || now.hold !== before.hold) {
        clearTimeout(undoTimer);
        if (now.stack.length > 0 && !now.hold) undoTimer = setTimeout(() => store.setState({ stack: [] }), UNDO_MS);
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

  // A write the device refused: the optimistic note is already rolled back; say why, and drop
  // the tap from the undo stack so Undo cannot point at a note that never existed.
  const failedIds = record.isError ? record.variables?.ids : undefined;
  useEffect(() => {
    if (!failedIds || !record.error) return;
    store.setState((s) => ({
      stack: s.stack.filter((r) => r.ids[0] !== failedIds[0]),
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
      const ids = newObservationIds(skaterIds.length);
      // mutate, not mutateAsync: the feed paints in this frame; the device commits after.
      record.mutate({ teamId, sessionId, skaterIds, cueId, mark, ids });
      store.setState((s) => {
        const top = latestOf(s);
        const again = !!top && top.cueId === cueId && top.mark === mark && sameSet(top.skaterIds, skaterIds);
        return { notice: null, stack: [...s.stack, { ids, cueId, mark, skaterIds, repeat: again ? top.repeat + 1 : 1, at: Date.now() }] };
      });
    },
    [store],
  );

  const undo = useCallback(() => {
    const { sessionId, remove, describe } = current.current;
    const top = latestOf(store.getState());
    if (!top || !sessionId) return;
    remove.mutate({ sessionId, ids: top.ids });
    store.setState((s) => ({ stack: s.stack.slice(0, -1), notice: { kind: 'undone', text: `Removed: ${describe(top)}` } }));
  }, [store]);

  const setHold = useCallback((hold: boolean) => store.setState({ hold }), [store]);
  const say = useCallback((notice: Notice | null) => store.setState({ notice }), [store]);

  return useMemo(() => ({ store, tap, undo, setHold, say }), [store, tap, undo, setHold, say]);
}
