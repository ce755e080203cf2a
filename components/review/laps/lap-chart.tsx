/**
 * The lap-time chart: one measure (the finish, or one section of the distance) of a skater's runs
 * over ISO weeks, drawn with react-native-svg from d3-scale (time across, ms up) and d3-shape
 * (the line through complete runs). The target is a dashed line, the personal best a ringed point
 * with "PB" over it, a partial or stopped run's lap a hollow diamond off the line. Lower is faster.
 *
 * Every point is also a real button laid over the drawing (48 px, focusable): hovering or focusing
 * it shows the run, tapping pins it. The drawing itself is one image with a summary for screen
 * readers; the same points are listed as a table beside it (lap-points-table.tsx).
 */
import { scaleLinear, scaleTime } from 'd3-scale';
import { line } from 'd3-shape';
import { TZDate } from '@date-fns/tz';
import { memo, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import Svg, { Circle, G, Line, Path, Polygon, Rect, Text as SvgText } from 'react-native-svg';

import type { LapTrend } from '../../../shared/schemas/review-laps';
import { formatRaceTime } from '../../../shared/timing';
import { addIsoWeeks, weekStartDay } from '../../../shared/weeks';
import { colors, fonts, marks, tapTarget } from '../../ui';
import type { ChartPoint, Measure } from './lap-view';

const MARGIN = { top: 28, right: 16, bottom: 40, left: 64 };
/** The target's colour: the dark orange of the marks, 4.6:1 on white (a line, not text). */
const TARGET = marks.needsWork.strong;
const HIT = tapTarget;

const midnight = (day: string, timeZone: string) => {
  const [y, m, d] = day.split('-').map(Number);
  return new TZDate(y, m - 1, d, timeZone);
};

export type LapChartProps = {
  trend: LapTrend;
  measure: Measure;
  points: ChartPoint[];
  targetMs: number | null;
  timeZone: string;
  width: number;
  height: number;
  /** The run pinned by a tap (drawn ringed). */
  pinnedId: string | null;
  /** A summary of the chart for screen readers. */
  summary: string;
  pointLabel: (point: ChartPoint) => string;
  onPeek: (runId: string | null) => void;
  onPin: (runId: string) => void;
};

export const LapChart = memo(function LapChart(props: LapChartProps) {
  const { trend, points, targetMs, timeZone, width, height, pinnedId, summary, pointLabel, onPeek, onPin } = props;
  const [focused, setFocused] = useState<string | null>(null);
  const plotW = Math.max(40, width - MARGIN.left - MARGIN.right);
  const plotH = Math.max(40, height - MARGIN.top - MARGIN.bottom);

  const start = midnight(weekStartDay(trend.from), timeZone);
  const end = midnight(weekStartDay(addIsoWeeks(trend.to, 1)), timeZone);
  const x = scaleTime().domain([start, end]).range([MARGIN.left, MARGIN.left + plotW]);

  const values = points.map((p) => p.ms).concat(targetMs !== null ? [targetMs] : []);
  const lo = values.length ? Math.min(...values) : 0;
  const hi = values.length ? Math.max(...values) : 1000;
  const pad = Math.max(200, (hi - lo) * 0.12);
  const y = scaleLinear()
    .domain([Math.max(0, lo - pad), hi + pad])
    .range([MARGIN.top + plotH, MARGIN.top])
    .nice(4);

  const at = (p: ChartPoint) => ({ cx: x(new Date(p.run.startedAt)), cy: y(p.ms) });
  const counted = points.filter((p) => p.counted);
  const path = line<ChartPoint>()
    .x((p) => at(p).cx)
    .y((p) => at(p).cy)(counted);

  // A week label every `step` weeks so the labels never touch (about 44 px each).
  const weekW = plotW / trend.weeks.length;
  const step = Math.max(1, Math.ceil(44 / weekW));
  const yTicks = y.ticks(4);

  return (
    <View style={[styles.wrap, { width, height }]} testID="laps-chart">
      <View role="img" aria-label={summary} testID="laps-chart-image" style={StyleSheet.absoluteFill}>
        <Svg width={width} height={height} aria-hidden>
          {/* Week columns: a line at each Monday, alternate weeks shaded. */}
          {trend.weeks.map((week, i) => {
            const left = x(midnight(weekStartDay(week), timeZone));
            return (
              <G key={week}>
                {i % 2 === 1 ? <Rect x={left} y={MARGIN.top} width={weekW} height={plotH} fill={colors.background} /> : null}
                {i % step === 0 ? (
                  <SvgText x={left + weekW / 2} y={MARGIN.top + plotH + 18} fontSize={13} fontFamily={fonts.regular} fill={colors.inkMuted} textAnchor="middle">
                    {`W${week.slice(-2)}`}
                  </SvgText>
                ) : null}
              </G>
            );
          })}
          {yTicks.map((t) => (
            <G key={t}>
              <Line x1={MARGIN.left} x2={MARGIN.left + plotW} y1={y(t)} y2={y(t)} stroke={colors.divider} strokeWidth={1} />
              <SvgText x={MARGIN.left - 6} y={y(t) + 5} fontSize={13} fontFamily={fonts.numbers} fill={colors.inkMuted} textAnchor="end">
                {formatRaceTime(Math.max(0, Math.round(t)))}
              </SvgText>
            </G>
          ))}
          <Line x1={MARGIN.left} x2={MARGIN.left} y1={MARGIN.top} y2={MARGIN.top + plotH} stroke={colors.border} strokeWidth={1} />
          <Line x1={MARGIN.left} x2={MARGIN.left + plotW} y1={MARGIN.top + plotH} y2={MARGIN.top + plotH} stroke={colors.border} strokeWidth={1} />
          <SvgText x={MARGIN.left + plotW} y={MARGIN.top + plotH + 34} fontSize={12} fontFamily={fonts.regular} fill={colors.inkMuted} textAnchor="end">
            {`ISO weeks, ${trend.from} to ${trend.to}`}
          </SvgText>
          {targetMs !== null ? (
            <G>
              <Line x1={MARGIN.left} x2={MARGIN.left + plotW} y1={y(targetMs)} y2={y(targetMs)} stroke={TARGET} strokeWidth={2} strokeDasharray="8 5" />
              {/* At the left: the newest runs, where the eye goes, sit at the right. */}
              <SvgText x={MARGIN.left + 6} y={y(targetMs) - 6} fontSize={13} fontFamily={fonts.bold} fill={marks.needsWork.ink} textAnchor="start">
                {`Target ${formatRaceTime(targetMs)}`}
              </SvgText>
            </G>
          ) : null}
          {path ? <Path d={path} stroke={colors.primary} strokeWidth={2.5} fill="none" /> : null}
          {points.map((p) => {
            const { cx, cy } = at(p);
            const ring = p.run.id === pinnedId || p.run.id === focused;
            return (
              <G key={p.run.id}>
                {ring ? <Circle cx={cx} cy={cy} r={14} stroke={colors.focus} strokeWidth={3} fill="none" /> : null}
                {p.best ? (
                  <>
                    <Circle cx={cx} cy={cy} r={10} stroke={colors.success} strokeWidth={2.5} fill="none" />
                    <SvgText x={cx} y={cy - 19} fontSize={13} fontFamily={fonts.bold} fill={colors.success} textAnchor="middle">
                      PB
                    </SvgText>
                  </>
                ) : null}
                {p.counted ? (
                  <Circle cx={cx} cy={cy} r={6} fill={colors.primary} />
                ) : (
                  <Polygon points={`${cx},${cy - 7} ${cx + 7},${cy} ${cx},${cy + 7} ${cx - 7},${cy}`} fill={colors.surface} stroke={colors.inkMuted} strokeWidth={2} />
                )}
              </G>
            );
          })}
        </Svg>
      </View>
      {points.map((p) => {
        const { cx, cy } = at(p);
        const pinned = p.run.id === pinnedId;
        return (
          <Pressable
            key={p.run.id}
            testID={`laps-point-${p.run.id}`}
            accessibilityRole="button"
            accessibilityLabel={pointLabel(p)}
            accessibilityState={{ selected: pinned }}
            aria-pressed={pinned}
            onPress={() => onPin(p.run.id)}
            onHoverIn={() => onPeek(p.run.id)}
            onHoverOut={() => onPeek(null)}
            onFocus={() => {
              setFocused(p.run.id);
              onPeek(p.run.id);
            }}
            onBlur={() => {
              setFocused(null);
              onPeek(null);
            }}
            style={[styles.hit, { left: cx - HIT / 2, top: cy - HIT / 2 }]}
          />
        );
      })}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { position: 'relative' },
  hit: { position: 'absolute', width: HIT, height: HIT, borderRadius: HIT / 2 },
});
