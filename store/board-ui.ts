/**
 * The board's UI state (zustand): which skaters are picked and which group the tiles show. Kept
 * out of the component so a trip to the Clock and back does not drop a half-made group cue.
 * Synced records stay in the device store and react-query, never here.
 */
import { create } from 'zustand';

/** 'all', 'none' (skaters in no group) or a group id. */
export type GroupFilter = string;

type BoardUi = {
  selected: string[];
  group: GroupFilter;
  toggleSkater: (id: string) => void;
  clearSelection: () => void;
  setGroup: (group: GroupFilter) => void;
};

export const useBoardUi = create<BoardUi>()((set) => ({
  selected: [],
  group: 'all',
  toggleSkater: (id) =>
    set((s) => ({ selected: s.selected.includes(id) ? s.selected.filter((x) => x !== id) : [...s.selected, id] })),
  clearSelection: () => set({ selected: [] }),
  setGroup: (group) => set({ group }),
}));
