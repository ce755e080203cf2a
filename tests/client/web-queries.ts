/**
 * Queries for @testing-library/react-native under the jest-expo/web preset. There, react-native
 * resolves to react-native-web, whose host elements are DOM tags carrying `data-testid` instead of
 * `testID`, so the library's own *ByTestId queries find nothing. These helpers look the DOM-style
 * attribute up on host elements; events still go through the library's fireEvent, which walks up
 * to the component that owns onPress / onChangeText / onBlur.
 */
import { act, screen } from '@testing-library/react-native';
import type { ReactTestInstance } from 'react-test-renderer';

const byTestId = (id: string) => (node: ReactTestInstance) =>
  typeof node.type === 'string' && node.props['data-testid'] === id;

export function queryByTestIdWeb(id: string): ReactTestInstance | null {
  const found = screen.UNSAFE_root.findAll(byTestId(id));
  return found[0] ?? null;
}

export function getByTestIdWeb(id: string): ReactTestInstance {
  const node = queryByTestIdWeb(id);
  if (!node) throw new Error(`No element with testID "${id}"`);
  return node;
}

/** The concatenated text inside an element. */
export function textOf(node: ReactTestInstance): string {
  return node.children.map((child) => (typeof child === 'string' ? child : textOf(child))).join('');
}

/**
 * Calls the nearest component handler named `handler` (onPress, onChangeText, onBlur...) from the
 * element up through its owners, inside act(). The library's own fireEvent consults react-native's
 * StyleSheet for pointer events, which is not available under the web preset.
 */
export async function fireWeb(node: ReactTestInstance, handler: string, ...args: unknown[]) {
  let current: ReactTestInstance | null = node;
  while (current) {
    // Skip DOM host elements: their handlers expect browser events, not React Native's.
    const fn = typeof current.type === 'string' ? undefined : current.props[handler];
    if (typeof fn === 'function') {
      await act(async () => {
        fn(...args);
      });
      return;
    }
    current = current.parent;
  }
  throw new Error(`No ${handler} handler above the element`);
}
