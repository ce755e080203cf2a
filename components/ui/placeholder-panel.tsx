/**
 * PlaceholderPanel: a friendly "being built" panel for sections that exist in the navigation but
 * not yet in full, so the app never shows an empty page or a dead end.
 */
import type { ReactNode } from 'react';

import { Card } from './card';
import { Text } from './text';

export function PlaceholderPanel({ title, children, testID }: { title: string; children?: ReactNode; testID?: string }) {
  return (
    <Card testID={testID}>
      <Text variant="bodyLarge" weight="bold">
        {title}
      </Text>
      {typeof children === 'string' ? <Text tone="muted">{children}</Text> : children}
    </Card>
  );
}
