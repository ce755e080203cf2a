/**
 * Small line icons for the coach's sections, drawn in SVG so they need no icon font. They sit next
 * to a always-visible text label: the label carries the meaning, the icon only helps scanning.
 */
import Svg, { Circle, Line, Path, Rect } from 'react-native-svg';

export type CoachSection = 'board' | 'clock' | 'review' | 'squad';

export function SectionIcon({ section, color, size = 26 }: { section: CoachSection; color: string; size?: number }) {
  const stroke = { stroke: color, strokeWidth: 2.2, fill: 'none', strokeLinecap: 'round' as const };
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" accessibilityElementsHidden importantForAccessibility="no">
      {section === 'board' ? (
        <>
          <Rect x="3" y="3" width="8" height="8" rx="2" {...stroke} />
          <Rect x="13" y="3" width="8" height="8" rx="2" {...stroke} />
          <Rect x="3" y="13" width="8" height="8" rx="2" {...stroke} />
          <Rect x="13" y="13" width="8" height="8" rx="2" {...stroke} />
        </>
      ) : section === 'clock' ? (
        <>
          <Circle cx="12" cy="13.5" r="8" {...stroke} />
          <Line x1="12" y1="13.5" x2="12" y2="9" {...stroke} />
          <Line x1="9.5" y1="2.5" x2="14.5" y2="2.5" {...stroke} />
        </>
      ) : section === 'review' ? (
        <>
          <Line x1="3" y1="21" x2="21" y2="21" {...stroke} />
          <Line x1="6" y1="17" x2="6" y2="11" {...stroke} />
          <Line x1="12" y1="17" x2="12" y2="5" {...stroke} />
          <Line x1="18" y1="17" x2="18" y2="9" {...stroke} />
        </>
      ) : (
        <>
          <Circle cx="9" cy="8" r="3.5" {...stroke} />
          <Path d="M2.5 20c0-3.6 2.9-6 6.5-6s6.5 2.4 6.5 6" {...stroke} />
          <Circle cx="17" cy="9" r="2.8" {...stroke} />
          <Path d="M16 14.2c3.2-.4 5.5 1.8 5.5 5.3" {...stroke} />
        </>
      )}
    </Svg>
  );
}
