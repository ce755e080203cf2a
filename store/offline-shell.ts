/**
 * Registers the service worker that keeps the app shell on the device (dist/sw.js, written at
 * build time), so that a reload at the rink without a network still opens Boardside. Only in
 * exported web builds: in development the bundler serves changing files the worker must not pin.
 */
import { Platform } from 'react-native';

export function registerOfflineShell() {
  if (Platform.OS !== 'web' || process.env.NODE_ENV !== 'production') return;
  if (typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
  navigator.serviceWorker.register('/sw.js').catch(() => {
    // No worker (private mode, old browser): the app still works online.
  });
}
