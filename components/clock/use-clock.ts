/**
 * The clock's UI state (zustand): the setup the coach is making (distance, track, who is in which
 * lane, the start offset), the heat being timed (its ids and the performance-clock instant of the
 * start, which no record holds), the last accepted tap per run (the double-tap rule), a short
 * notice, the voice switch and which finished heat is on show. Kept out of the components so a
 * trip to the Board and back mid-race keeps the running clock.
 *
 * Records (runs, crossings, targets) stay in the device store and react-query, never here: a
 * reload loses this state, and the screen rebuilds the heat from the open runs (see resumeHeat).
 */
import { create } from 'zustand';

import type { Track } from '../../shared/timing';
import { GROUP_MAX } from './clock-math';

export type OffsetMode = 'none' | 'gun' | 'direct';
export type LaneMode = 'pair' | 'group';

export interface ClockSetup {
  track: Track;
  distanceM: number;
  mode: LaneMode;
  inner: string | null;
  outer: string | null;
  group: string[];
  offsetMode: OffsetMode;
  /** Metres from the starter to the coach, for a gun heard from the far side. */
  gunDistanceM: number;
  /** A typed offset in seconds ("0.30"). */
  offsetText: string;
}

export interface LiveHeat {
  heatId: string;
  runIds: string[];
  /** The start tap's event.timeStamp (performance clock of this page). */
  startPerfTs: number;
  startedAt: string;
  /** The rink day of the start (the runs' day). */
  day: string;
  offsetMs: number;
  distanceM: number;
  track: Track;
  /** Rebuilt after a reload from the wall-clock start: later crossings lean on the device clock. */
  resumed: boolean;
}

export interface ClockNotice {
  id: number;
  kind: 'ignored' | 'info' | 'error';
  text: string;
}

type ClockUi = {
  setup: ClockSetup;
  live: LiveHeat | null;
  /** performance-clock time of each run's last accepted tap. */
  lastTap: Record<string, number>;
  notice: ClockNotice | null;
  voiceOn: boolean;
  /** The finished heat shown under the setup (its table), or null. */
  shownHeatId: string | null;
  /** Whether this page load has looked for a heat left running (once per load). */
  resumeChecked: boolean;
  markResumeChecked: () => void;
  patchSetup: (patch: Partial<ClockSetup>) => void;
  /** Tapping a skater in the setup: pair → first free lane (or out again); group → in or out. */
  pickSkater: (skaterId: string) => void;
  swapLanes: () => void;
  clearLane: (lane: 'inner' | 'outer') => void;
  startHeat: (heat: LiveHeat) => void;
  acceptTap: (runId: string, ts: number) => void;
  forgetTap: (runId: string) => void;
  endHeat: () => void;
  say: (kind: ClockNotice['kind'], text: string) => void;
  clearNotice: () => void;
  setVoice: (on: boolean) => void;
  showHeat: (heatId: string | null) => void;
};

export const initialSetup: ClockSetup = {
  track: 'long',
  distanceM: 1500,
  mode: 'pair',
  inner: null,
  outer: null,
  group: [],
  offsetMode: 'none',
  gunDistanceM: 100,
  offsetText: '0.30',
};

let notices = 0;

export const useClockUi = create<ClockUi>()((set) => ({
  setup: initialSetup,
  live: null,
  lastTap: {},
  notice: null,
  voiceOn: true,
  shownHeatId: null,
  resumeChecked: false,
  markResumeChecked: () => set({ resumeChecked: true }),
  patchSetup: (patch) => set((s) => ({ setup: { ...s.setup, ...patch } })),
  pickSkater: (id) =>
    set((s) => {
      const st = s.setup;
      if (st.mode === 'group') {
        if (st.group.includes(id)) return { setup: { ...st, group: st.group.filter((x) => x !== id) } };
        if (st.group.length >= GROUP_MAX) return s;
        return { setup: { ...st, group: [...st.group, id] } };
      }
      if (st.inner === id) return { setup: { ...st, inner: null } };
      if (st.outer === id) return { setup: { ...st, outer: null } };
      if (!st.inner) return { setup: { ...st, inner: id } };
      if (!st.outer) return { setup: { ...st, outer: id } };
      // Both lanes taken: the newest pick replaces the outer lane.
      return { setup: { ...st, outer: id } };
    }),
  swapLanes: () => set((s) => ({ setup: { ...s.setup, inner: s.setup.outer, outer: s.setup.inner } })),
  clearLane: (lane) => set((s) => ({ setup: { ...s.setup, [lane]: null } })),
  startHeat: (heat) => set({ live: heat, lastTap: {}, notice: null, shownHeatId: null }),
  acceptTap: (runId, ts) => set((s) => ({ lastTap: { ...s.lastTap, [runId]: ts } })),
  forgetTap: (runId) =>
    set((s) => {
      const { [runId]: _gone, ...rest } = s.lastTap;
      return { lastTap: rest };
    }),
  endHeat: () => set((s) => ({ live: null, lastTap: {}, shownHeatId: s.live?.heatId ?? s.shownHeatId })),
  say: (kind, text) => set({ notice: { id: (notices += 1), kind, text } }),
  clearNotice: () => set({ notice: null }),
  setVoice: (voiceOn) => set({ voiceOn }),
  showHeat: (shownHeatId) => set({ shownHeatId }),
}));
