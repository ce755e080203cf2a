/**
 * The board's recording loop: a tap on a chip records one note per picked skater at once
 * (optimistic, no await), and keeps a short stack of recent taps for the undo bar. Every tap is
 * its own entry, so a double tap shows "Noted again ×2" and each can be undone in turn; the bar
 * stays for UNDO_MS after the latest change, and while the coach is typing a note.
 */
import { useEffect, useRef, useState } from 'react';

import type { Mark } from '../../shared/schemas';
import { newObservationIds, useRecordObservations, useRemoveObservations } from '../../store/board';

export const UNDO_MS = 8000;
const NOTICE_MS = 4000;

export type Recording = { ids: string[]; cueId: string; mark: Mark; skaterIds: string[]; repeat: number; at: number };
export type Notice = { kind: 'prompt' | 'undone' | 'error' | 'saved'; text: string };

const sameSet = (a: readonly string[], b: readonly string[]) => a.length === b.length && a.every((x) => b.includes(x));

export function useRecorder(teamId: string, sessionId: string | undefined, describe: (r: Recording) => string) {
  const record = useRecordObservations();
  const remove = useRemoveObservations();
  const [stack, setStack] = useState<Recording[]>([]);
  const [notice, setNotice] = useState<Notice | null>(null);
  const [hold, setHold] = useState(false);
  const describeRef = useRef(describe);
  describeRef.current = describe;

  useEffect(() => {
    if (stack.length === 0 || hold) return;
    const timer = setTimeout(() => setStack([]), UNDO_MS);
    return () => clearTimeout(timer);
  }, [stack, hold]);

  useEffect(() => {
    if (!notice || notice.kind === 'error') return;
    const timer = setTimeout(() => setNotice(null), NOTICE_MS);
    return () => clearTimeout(timer);
  }, [notice]);

  // A write the device refused: the optimistic note is already rolled back; say why, and drop
  // the tap from the undo stack so Undo cannot point at a note that never existed.
  const failedIds = record.isError ? record.variables?.ids : undefined;
  useEffect(() => {
    if (!failedIds || !record.error) return;
    setStack((prev) => prev.filter((r) => r.ids[0] !== failedIds[0]));
    setNotice({ kind: 'error', text: `Not saved: ${record.error.message}` });
  }, [failedIds, record.error]);

  useEffect(() => {
    if (remove.isError && remove.error) setNotice({ kind: 'error', text: `Could not undo: ${remove.error.message}` });
  }, [remove.isError, remove.error]);

  const tap = (cueId: string, mark: Mark, skaterIds: string[]) => {
    if (skaterIds.length === 0) {
      setNotice({ kind: 'prompt', text: 'Pick a skater first: tap a tile, then the cue.' });
      return;
    }
    if (!sessionId) return;
    const ids = newObservationIds(skaterIds.length);
    // mutate, not mutateAsync: the feed paints in this frame; the device commits after.
    record.mutate({ teamId, sessionId, skaterIds, cueId, mark, ids });
    setNotice(null);
    setStack((prev) => {
      const top = prev[prev.length - 1];
      const again = !!top && top.cueId === cueId && top.mark === mark && sameSet(top.skaterIds, skaterIds);
      return [...prev, { ids, cueId, mark, skaterIds, repeat: again ? top.repeat + 1 : 1, at: Date.now() }];
    });
  };

  const undo = () => {
    const top = stack[stack.length - 1];
    if (!top || !sessionId) return;
    remove.mutate({ sessionId, ids: top.ids });
    setStack((prev) => prev.slice(0, -1));
    setNotice({ kind: 'undone', text: `Removed: ${describeRef.current(top)}` });
  };

  return {
    latest: stack[stack.length - 1] ?? null,
    notice,
    tap,
    undo,
    setHold,
    say: (n: Notice | null) => setNotice(n),
  };
}
