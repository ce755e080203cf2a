/**
 * The screen stays on while a heat is timed (a fake Screen Wake Lock API in place of the
 * browser's): the lock is asked for when timing starts, given back when it ends, asked for again
 * when the page shows after being hidden (the browser drops it on hide), and a browser without the
 * API or one that refuses is reported so the screen can say so.
 */
import { act, renderHook, waitFor } from '@testing-library/react-native';

import { useWakeLock } from '../../components/clock/wake-lock';

type Listener = () => void;

function fakeWakeLock({ refuse = false } = {}) {
  const held: { released: boolean; fire: () => void }[] = [];
  const api = {
    request: jest.fn(async (type: string) => {
      expect(type).toBe('screen');
      if (refuse) throw new Error('NotAllowedError');
      let onRelease: Listener = () => undefined;
      const sentinel = {
        released: false,
        fire: () => onRelease(),
        release: jest.fn(async () => {
          sentinel.released = true;
          onRelease();
        }),
        addEventListener: (_type: 'release', fn: Listener) => {
          onRelease = fn;
        },
      };
      held.push(sentinel);
      return sentinel;
    }),
  };
  Object.defineProperty(navigator, 'wakeLock', { value: api, configurable: true });
  return { api, held };
}

function setVisibility(state: 'visible' | 'hidden') {
  Object.defineProperty(document, 'visibilityState', { value: state, configurable: true });
  document.dispatchEvent(new Event('visibilitychange'));
}

describe('useWakeLock', () => {
  afterEach(() => {
    delete (navigator as unknown as { wakeLock?: unknown }).wakeLock;
    setVisibility('visible');
  });

  it('holds the lock while active and gives it back when timing ends', async () => {
    const { api, held } = fakeWakeLock();
    const { result, rerender } = renderHook(({ active }: { active: boolean }) => useWakeLock(active), { initialProps: { active: false } });
    expect(result.current).toBe('off');
    expect(api.request).not.toHaveBeenCalled();
    rerender({ active: true });
    await waitFor(() => expect(result.current).toBe('on'));
    expect(api.request).toHaveBeenCalledTimes(1);
    rerender({ active: false });
    await waitFor(() => expect(held[0].released).toBe(true));
    expect(result.current).toBe('off');
  });

  it('asks again when the page shows after the browser dropped the lock on hide', async () => {
    const { api, held } = fakeWakeLock();
    const { result } = renderHook(() => useWakeLock(true));
    await waitFor(() => expect(result.current).toBe('on'));
    // The browser releases the lock when the page is hidden.
    await act(async () => {
      setVisibility('hidden');
      held[0].fire();
    });
    expect(result.current).toBe('off');
    await act(async () => setVisibility('visible'));
    await waitFor(() => expect(result.current).toBe('on'));
    expect(api.request).toHaveBeenCalledTimes(2);
  });

  it('reports a refusal, and a browser without the API', async () => {
    fakeWakeLock({ refuse: true });
    const refused = renderHook(() => useWakeLock(true));
    await waitFor(() => expect(refused.result.current).toBe('refused'));
    refused.unmount();
    delete (navigator as unknown as { wakeLock?: unknown }).wakeLock;
    const missing = renderHook(() => useWakeLock(true));
    expect(missing.result.current).toBe('unsupported');
  });
});
