/**
 * When to sync: the triggers (reconnect, focus, by hand, a quiet period after new taps) all come
 * here, and this decides when a run starts. Never two runs at once: a trigger during a run asks
 * for exactly one more run after it (so taps made meanwhile are sent too). A failed run is tried
 * again with growing pauses while the triggers stay quiet.
 *
 * No React and no timers of its own choosing: store/sync-status.ts wires it to the app, and tests
 * drive it with jest's fake timers.
 */
export interface SchedulerOptions {
  /** One sync run; resolves true when it succeeded. Must not throw. */
  run: () => Promise<boolean>;
  /** Automatic triggers are skipped while this says no (e.g. known offline). Default: always. */
  canRun?: () => boolean;
  /** Quiet period after the last local change before a run starts. */
  quietMs?: number;
  /** Pauses before retrying a failed run; the last one repeats. Empty: no automatic retry. */
  retryMs?: readonly number[];
}

export const DEFAULT_QUIET_MS = 5_000;
export const DEFAULT_RETRY_MS = [15_000, 30_000, 60_000, 120_000, 300_000] as const;

export class SyncScheduler {
  private running: Promise<void> | null = null;
  private again = false;
  private quietTimer: ReturnType<typeof setTimeout> | null = null;
  private retryTimer: ReturnType<typeof setTimeout> | null = null;
  private failures = 0;
  private disposed = false;

  constructor(private readonly options: SchedulerOptions) {}

  get isRunning(): boolean {
    return this.running !== null;
  }

  /**
   * Runs now (or right after the running run). `automatic` triggers respect canRun; a run asked
   * for by hand always goes.
   */
  request(automatic = true): Promise<void> {
    if (this.disposed) return Promise.resolve();
    if (automatic && this.options.canRun && !this.options.canRun()) return Promise.resolve();
    this.clearTimer('quiet');
    this.clearTimer('retry');
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = this.loop().finally(() => {
      this.running = null;
    });
    return this.running;
  }

  /** A local change was written: run once things have been quiet for a while. */
  changed(): void {
    if (this.disposed) return;
    this.clearTimer('quiet');
    this.quietTimer = setTimeout(() => {
      this.quietTimer = null;
      void this.request();
    }, this.options.quietMs ?? DEFAULT_QUIET_MS);
  }

  dispose(): void {
    this.disposed = true;
    this.clearTimer('quiet');
    this.clearTimer('retry');
  }

  private async loop(): Promise<void> {
    do {
      this.again = false;
      const ok = await this.options.run();
      this.failures = ok ? 0 : this.failures + 1;
    } while (this.again && !this.disposed);
    if (this.failures > 0 && !this.disposed) this.scheduleRetry();
  }

  private scheduleRetry() {
    const pauses = this.options.retryMs ?? DEFAULT_RETRY_MS;
    if (pauses.length === 0) return;
    const pause = pauses[Math.min(this.failures - 1, pauses.length - 1)];
    this.retryTimer = setTimeout(() => {
      this.retryTimer = null;
      void this.request();
    }, pause);
  }

  private clearTimer(which: 'quiet' | 'retry') {
    const timer = which === 'quiet' ? this.quietTimer : this.retryTimer;
    if (timer) clearTimeout(timer);
    if (which === 'quiet') this.quietTimer = null;
    else this.retryTimer = null;
  }
}
