/** Step 7, when to sync: never two runs at once, one follow-up for triggers during a run, a quiet period after taps, retries after failures. */
import { SyncScheduler } from '../../sync/scheduler';

const flush = async () => {
  for (let i = 0; i < 10; i += 1) await Promise.resolve();
};

describe('SyncScheduler', () => {
  beforeEach(() => jest.useFakeTimers());
  afterEach(() => jest.useRealTimers());

  function harness(results: boolean[] = []) {
    let active = 0;
    let maxActive = 0;
    let runs = 0;
    const gates: (() => void)[] = [];
    const scheduler = new SyncScheduler({
      run: () => {
        runs += 1;
        active += 1;
        maxActive = Math.max(maxActive, active);
        return new Promise<boolean>((resolve) =>
          gates.push(() => {
            active -= 1;
            resolve(results.shift() ?? true);
          }),
        );
      },
      quietMs: 5000,
      retryMs: [15_000, 30_000],
    });
    const finish = async () => {
      gates.shift()?.();
      await flush();
    };
    return { scheduler, finish, stats: () => ({ runs, maxActive, waiting: gates.length }) };
  }

  it('never runs twice at once; triggers during a run give exactly one more run', async () => {
    const { scheduler, finish, stats } = harness();
    void scheduler.request();
    void scheduler.request();
    void scheduler.request(false);
    await flush();
    expect(stats()).toMatchObject({ runs: 1, maxActive: 1 });
    await finish();
    expect(stats()).toMatchObject({ runs: 2, maxActive: 1 });
    await finish();
    expect(stats().runs).toBe(2);
    expect(scheduler.isRunning).toBe(false);
  });

  it('runs 5 s after the last local change', async () => {
    const { scheduler, stats } = harness();
    scheduler.changed();
    jest.advanceTimersByTime(4000);
    scheduler.changed();
    jest.advanceTimersByTime(4000);
    expect(stats().runs).toBe(0);
    jest.advanceTimersByTime(1000);
    await flush();
    expect(stats().runs).toBe(1);
  });

  it('retries a failed run with growing pauses, and stops after a success', async () => {
    const { scheduler, finish, stats } = harness([false, false, true]);
    void scheduler.request();
    await finish();
    jest.advanceTimersByTime(14_999);
    expect(stats().runs).toBe(1);
    jest.advanceTimersByTime(1);
    await finish();
    expect(stats().runs).toBe(2);
    jest.advanceTimersByTime(30_000);
    await finish();
    expect(stats().runs).toBe(3);
    jest.advanceTimersByTime(600_000);
    expect(stats().runs).toBe(3);
  });

  it('skips automatic triggers while it cannot run, but not a run by hand', async () => {
    let runs = 0;
    const scheduler = new SyncScheduler({ run: async () => (runs += 1) > 0, canRun: () => false, retryMs: [] });
    await scheduler.request();
    expect(runs).toBe(0);
    await scheduler.request(false);
    expect(runs).toBe(1);
    scheduler.dispose();
  });
});
