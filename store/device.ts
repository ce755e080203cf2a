/**
 * Which state this tab's device database is in (zustand): opening, ready, held by another tab,
 * handed over to another tab, or failed. The device gate drives it; screens only read it.
 */
import { create } from 'zustand';

export type DeviceStatus = 'opening' | 'ready' | 'elsewhere' | 'moved' | 'failed';

type DeviceState = { status: DeviceStatus; error: string | null; set: (status: DeviceStatus, error?: string | null) => void };

export const useDevice = create<DeviceState>()((set) => ({
  status: 'opening',
  error: null,
  set: (status, error = null) => set({ status, error }),
}));
