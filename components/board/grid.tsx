/**
 * Grid: lays its children out in as many equal columns as the measured width allows (between
 * minColumns and maxColumns). The same tiles give two columns on a 390 px phone and more in a
 * wide pane, without a stretched single column. Widths are percentages, so a scrollbar that
 * appears after measuring narrows the items instead of pushing one onto the next row.
 */
import { Children, isValidElement, useCallback, useMemo, useState, type ReactNode } from 'react';
import type { LayoutChangeEvent } from 'react-native';
import { View } from 'react-native';

import { spacing } from '../ui';

export type GridProps = {
  children: ReactNode;
  minItemWidth: number;
  minColumns?: number;
  maxColumns?: number;
  gap?: number;
  testID?: string;
};

export function Grid({ children, minItemWidth, minColumns = 1, maxColumns = 4, gap = spacing.sm, testID }: GridProps) {
  const [width, setWidth] = useState(0);
  const fit = Math.floor((width + gap) / (minItemWidth + gap));
  const columns = Math.max(minColumns, Math.min(maxColumns, fit || minColumns));
  const half = gap / 2;
  // The same style objects from render to render: the items' wrappers need no new styles.
  const rowStyle = useMemo(() => ({ flexDirection: 'row', flexWrap: 'wrap', marginHorizontal: -half, marginBottom: -gap }) as const, [half, gap]);
  const itemStyle = useMemo(() => ({ width: `${100 / columns}%`, paddingHorizontal: half, paddingBottom: gap }) as const, [columns, half, gap]);
  const onLayout = useCallback((event: LayoutChangeEvent) => setWidth(Math.floor(event.nativeEvent.layout.width) - gap), [gap]);
  return (
    <View testID={testID} style={rowStyle} onLayout={onLayout}>
      {Children.toArray(children).map((child, index) => (
        <View key={isValidElement(child) && child.key != null ? child.key : index} style={itemStyle}>
          {child}
        </View>
      ))}
    </View>
  );
}
