/**
 * Ops for the clock's tables (runs, crossings, targets) as the device store makes them (one clock
 * value per changed field), for the sync integration tests.
 */
import { v7 as uuidv7 } from 'uuid';
import { targetIdFor } from '../../../shared/schemas/clock';
import type { Op } from '../../../shared/schemas/sync';
import { upsert, userIdOf, type Device } from '../sync-helpers';

export interface RunOpInput {
  id?: string;
  heatId?: string;
  skaterId: string;
  distanceM?: number;
  track?: 'long' | 'short';
  lane?: 'inner' | 'outer' | 'group';
  day?: string;
  extra?: Record<string, unknown>;
}

/** A new run, timed by the device's account. */
export function runCreate(dev: Device, input: RunOpInput): Op {
  const now = new Date().toISOString();
  return upsert(dev, 'runs', input.id ?? uuidv7(), {
    heatId: input.heatId ?? uuidv7(),
    skaterId: input.skaterId,
    day: input.day ?? '2026-01-15',
    distanceM: input.distanceM ?? 1500,
    track: input.track ?? 'long',
    lane: input.lane ?? 'inner',
    startedAt: now,
    startOffsetMs: 0,
    targetMs: null,
    status: 'running',
    stopReason: '',
    note: '',
    createdBy: userIdOf(dev.account),
    authorName: '',
    createdAt: now,
    ...input.extra,
  });
}

export function crossingCreate(dev: Device, runId: string, atMs: number, extra: Record<string, unknown> = {}, id = uuidv7()): Op {
  return upsert(dev, 'crossings', id, { runId, atMs, handTimed: false, createdAt: new Date().toISOString(), ...extra });
}

export interface TargetOpInput {
  teamId: string;
  skaterId: string;
  track?: 'long' | 'short';
  distanceM?: number;
  targetMs?: number;
  extra?: Record<string, unknown>;
  /** Another id than the derived one (a forged op). */
  id?: string;
}

export function targetSet(dev: Device, input: TargetOpInput): Op {
  const track = input.track ?? 'long';
  const distanceM = input.distanceM ?? 1500;
  return upsert(dev, 'targets', input.id ?? targetIdFor(input.teamId, input.skaterId, track, distanceM), {
    skaterId: input.skaterId,
    distanceM,
    track,
    targetMs: input.targetMs ?? 118_000,
    plan: 'even',
    openerMs: null,
    sharesPct: null,
    note: '',
    updatedBy: userIdOf(dev.account),
    ...input.extra,
  });
}
