/**
 * The board's UI state (zustand): which skaters are picked, which group the tiles show and which
 * set of chips the phone shows (the focus cues or one phase). Kept out of the component so a trip
 * to the Clock and back does not drop a half-made group cue or the phase the coach was on.
 * Synced records stay in the device store and react-query, never here.
 */
import { create } from 'zustand';

/** 'all', 'none' (skaters in no group) or a group id. */
export type GroupFilter = string;

/** The phone's chip set: 'focus' (the session's focus cues), a phase, or null (the board picks). */
export type ChipSet = string | null;

type BoardUi = {
  selected: string[];
  group: GroupFilter;
  chipSet: ChipSet;
  toggleSkater: (id: string) => void;
  clearSelection: () => void;
  setGroup: (group: GroupFilter) => void;
  setChipSet: (set: ChipSet) => void;
};

export const useBoardUi = create<BoardUi>()((set) => ({
  selected: [],
  group: 'all',
  chipSet: null,
  toggleSkater: (id) =>
    set((s) => ({ selected: s.selected.includes(id) ? s.selected.filter((x) => x !== id) : [...s.selected, id] })),
  clearSelection: () => set((s) => (s.selected.length === 0 ? s : { selected: [] })),
  setGroup: (group) => set({ group }),
  setChipSet: (chipSet) => set({ chipSet }),
}));
