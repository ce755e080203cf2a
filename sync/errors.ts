/** Errors of a sync run: each names the step that failed. */

export type SyncStep = 'push' | 'pull' | 'apply';

const STEP_WORDS: Record<SyncStep, string> = {
  push: 'sending changes',
  pull: 'fetching changes',
  apply: 'saving fetched changes on this device',
};

export class SyncError extends Error {
  constructor(
    readonly step: SyncStep,
    readonly cause: unknown,
  ) {
    super(`Sync failed while ${STEP_WORDS[step]} (${step}): ${cause instanceof Error ? cause.message : String(cause)}`);
    this.name = 'SyncError';
  }
}

/** synchronize() was called while a run for the same device store was still going. */
export class SyncBusy extends Error {
  constructor() {
    super('A sync is already running on this device; wait for it to finish.');
    this.name = 'SyncBusy';
  }
}

export const wrapStep = (step: SyncStep, error: unknown): SyncError =>
  error instanceof SyncError ? error : new SyncError(step, error);
