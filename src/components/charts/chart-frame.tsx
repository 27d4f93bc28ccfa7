import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import Svg, { G, Line, Text as SvgText } from 'react-native-svg';
import { chartHeight, chartText, font, radius, space, useColors } from '../../theme';
import { Text } from '../ui/text';
import type { Box, Tick } from './axes';

type Props = {
  label: string;
  xTitle: string;
  yTitle: string;
  testID: string;
  /** Draws the data for a measured width: returns the geometry's ticks and the marks. */
  render: (width: number, height: number) => { box: Box; xTicks: Tick[]; yTicks: Tick[]; marks: ReactNode };
};

/**
 * The one frame of every chart: an SVG as wide as its container, `chartHeight` tall, with grid, ticks and axis titles
 * in the margins of `plotBox`; the marks come from a geometry.
 */
export function ChartFrame({ label, xTitle, yTitle, testID, render }: Props) {
  const c = useColors();
  const [width, setWidth] = useState(0);
  const drawn = width > 0 ? render(width, chartHeight) : null;
  return (
    <View
      testID={testID}
      accessibilityRole="image"
      accessibilityLabel={label}
      style={{ height: chartHeight }}
      onLayout={(e) => setWidth(Math.floor(e.nativeEvent.layout.width))}
    >
      {drawn ? (
        <Svg width={width} height={chartHeight}>
          <G>
            {drawn.yTicks.map((t) => (
              <G key={`y${t.value}`}>
                <Line x1={drawn.box.left} x2={drawn.box.right} y1={t.pos} y2={t.pos} stroke={c.chartGrid} strokeWidth={1} />
                <SvgText x={drawn.box.left - 6} y={t.pos + 4} fontSize={chartText.tick} fontFamily={font.regular} fill={c.textMuted} textAnchor="end">
                  {t.label}
                </SvgText>
              </G>
            ))}
            {drawn.xTicks.map((t) => (
              <SvgText
                key={`x${t.value}`}
                x={t.pos}
                y={drawn.box.bottom + 16}
                fontSize={chartText.tick}
                fontFamily={font.regular}
                fill={c.textMuted}
                textAnchor="middle"
              >
                {t.label}
              </SvgText>
            ))}
            <Line x1={drawn.box.left} x2={drawn.box.right} y1={drawn.box.bottom} y2={drawn.box.bottom} stroke={c.border} strokeWidth={1} />
            <SvgText
              x={(drawn.box.left + drawn.box.right) / 2}
              y={chartHeight - 4}
              fontSize={chartText.title}
              fontFamily={font.semibold}
              fill={c.textMuted}
              textAnchor="middle"
            >
              {xTitle}
            </SvgText>
            <SvgText x={4} y={14} fontSize={chartText.title} fontFamily={font.semibold} fill={c.textMuted}>
              {yTitle}
            </SvgText>
          </G>
          {drawn.marks}
        </Svg>
      ) : null}
    </View>
  );
}

/** Colours for series (one per temperature), from the palette's semantic chart and state colours. */
export function useSeriesColors(): string[] {
  const c = useColors();
  return [c.chartLine, c.chartLineAlt, c.success, c.warning, c.primary, c.danger];
}

/**
 * One legend item. `point` (default): a round swatch, for points or a series by colour; `line`: a short stroke with
 * the line's dash pattern; `band`: a flat swatch for a shaded range; `marker`: a dot and the label in its colour.
 */
export type LegendItem = { label: string; color: string; mark?: 'point' | 'line' | 'band' | 'marker'; dashArray?: string; roundCap?: boolean };

/** The key under every chart, as text so it reads without the picture. */
export function Legend({ items, testID }: { items: LegendItem[]; testID?: string }) {
  return (
    <View style={styles.legend} testID={testID}>
      {items.map((it, i) => (
        <View key={`${i}-${it.label}`} style={styles.legendItem}>
          {it.mark === 'line' ? (
            <Svg width={24} height={6} aria-hidden>
              <Line
                x1={1}
                x2={23}
                y1={3}
                y2={3}
                stroke={it.color}
                strokeWidth={2.5}
                strokeLinecap={it.roundCap ? 'round' : undefined}
                strokeDasharray={it.dashArray}
              />
            </Svg>
          ) : (
            <View style={[it.mark === 'band' ? styles.band : styles.point, { backgroundColor: it.color }]} />
          )}
          {it.mark === 'marker' ? (
            <Text variant="caption" weight="semibold" style={{ color: it.color }}>
              {it.label}
            </Text>
          ) : (
            <Text variant="caption" tone="muted">
              {it.label}
            </Text>
          )}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  point: { width: space.sm + space.xxs, height: space.sm + space.xxs, borderRadius: radius.pill },
  band: { width: space.md, height: space.xs, borderRadius: space.xxs },
});
