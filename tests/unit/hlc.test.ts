/** The hybrid logical clock: monotonic, ordered as strings, folds remote clocks in. */
import { decodeHlc, encodeHlc, HybridClock } from '../../shared/hlc';

describe('HybridClock', () => {
  it('is strictly increasing even when the wall clock stands still or goes back', () => {
    const times = [1000, 1000, 1000, 999, 500, 1001, 1001];
    let i = 0;
    const clock = new HybridClock('dev-a', () => times[Math.min(i++, times.length - 1)]);
    const values = times.map(() => clock.now());
    const sorted = [...values].sort();
    expect(values).toEqual(sorted);
    expect(new Set(values).size).toBe(values.length);
    expect(decodeHlc(values[4])).toEqual({ wall: 1000, counter: 4, node: 'dev-a' });
    expect(decodeHlc(values[5])).toEqual({ wall: 1001, counter: 0, node: 'dev-a' });
  });

  it('orders as strings the way it orders as numbers across digit counts', () => {
    const a = encodeHlc({ wall: 999, counter: 5, node: 'x' });
    const b = encodeHlc({ wall: 1000, counter: 0, node: 'x' });
    expect(a < b).toBe(true);
  });

  it('after receiving a remote value, the next local value is later than it', () => {
    const clock = new HybridClock('dev-a', () => 1000);
    const remote = encodeHlc({ wall: 5000, counter: 7, node: 'server' });
    clock.receive(remote);
    const next = clock.now();
    expect(next > remote).toBe(true);
    expect(decodeHlc(next).wall).toBe(5000);
  });

  it('resumes from a persisted value without going back', () => {
    const first = new HybridClock('dev-a', () => 2000);
    const saved = first.now();
    const resumed = new HybridClock('dev-a', () => 1500, saved);
    expect(resumed.now() > saved).toBe(true);
  });

  it('rejects values that are not HLCs', () => {
    expect(() => decodeHlc('yesterday')).toThrow(SyntaxError);
  });
});
