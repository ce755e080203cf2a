/**
 * Client test setup: @testing-library/react-native 13 renders through react-test-renderer, which
 * React 19 flags as deprecated on every render. That one known message is dropped so real errors
 * stand out; every other console.error still prints.
 */
const original = console.error;
console.error = (...args: unknown[]) => {
  if (typeof args[0] === 'string' && args[0].includes('react-test-renderer is deprecated')) return;
  original(...args);
};
