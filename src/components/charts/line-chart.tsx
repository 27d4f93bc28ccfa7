import { StyleSheet, View } from 'react-native';
import { Circle, G, Line, Path } from 'react-native-svg';
import { space, useColors, type Palette } from '../../theme';
import { Text } from '../ui/text';
import { ChartFrame, Legend, type LegendItem } from './chart-frame';
import { lineChartGeometry, type BandSeries, type LineSeries, type MarkerSpec } from './line-chart-geometry';

// `limit`: a bound that is never planned past (a vessel's maximum), in the danger colour.
export type ChartTone = 'primary' | 'accent' | 'third' | 'fourth' | 'limit';

const toneColor = (c: Palette, t: ChartTone) => ({ primary: c.chartLine, accent: c.chartLineAlt, third: c.success, fourth: c.warning, limit: c.danger })[t];
// Dashes and dots tell lines apart without colour too; the legend draws the same pattern.
const dashOf = (s: { dashed?: boolean; dotted?: boolean }) => (s.dotted ? '1.5 4' : s.dashed ? '6 4' : undefined);

type Props = {
  title: string;
  /** The chart's text equivalent: a sentence with the key numbers, shown under it and read by screen readers. */
  summary: string;
  series: (LineSeries & { tone: ChartTone; label: string; dashed?: boolean; dotted?: boolean })[];
  bands?: (BandSeries & { tone: ChartTone; label: string })[];
  markers?: (MarkerSpec & { tone: ChartTone })[];
  xLabel: string;
  yLabel: string;
  yFromZero?: boolean;
  formatX?: (v: number) => string;
  formatY?: (v: number) => string;
  testID: string;
};

/** A line chart in the one chart frame, with a title, the legend and its sentence equivalent. */
export function LineChart({ title, summary, series, bands = [], markers = [], xLabel, yLabel, yFromZero, formatX, formatY, testID }: Props) {
  const c = useColors();
  return (
    <View style={styles.wrap} testID={testID}>
      <Text weight="semibold">{title}</Text>
      <ChartFrame
        testID={`${testID}-plot`}
        label={`${title}. ${summary}`}
        xTitle={xLabel}
        yTitle={yLabel}
        render={(width, height) => {
          const g = lineChartGeometry({ width, height, series, bands, markers, yFromZero, formatX, formatY });
          return {
            ...g,
            marks: (
              <G>
                {g.bands.map((b, i) => (
                  <Path key={b.id} d={b.d} fill={toneColor(c, bands[i]!.tone)} fillOpacity={0.18} stroke="none" />
                ))}
                {g.lines.map((l, i) => (
                  <Path
                    key={l.id}
                    d={l.d}
                    fill="none"
                    stroke={toneColor(c, series[i]!.tone)}
                    strokeWidth={2.5}
                    strokeLinecap={series[i]!.dotted ? 'round' : undefined}
                    strokeDasharray={dashOf(series[i]!)}
                  />
                ))}
                {g.markers.map((m, i) => {
                  const color = toneColor(c, markers[i]!.tone);
                  return (
                    <G key={m.id}>
                      <Line x1={m.cx} x2={m.cx} y1={m.cy} y2={g.box.bottom} stroke={color} strokeWidth={1} strokeDasharray="3 3" />
                      <Circle cx={m.cx} cy={m.cy} r={5} fill={color} stroke={c.surface} strokeWidth={2} />
                    </G>
                  );
                })}
              </G>
            ),
          };
        }}
      />
      <Legend
        items={[
          ...series.map((s): LegendItem => ({ label: s.label, color: toneColor(c, s.tone), mark: 'line', dashArray: dashOf(s), roundCap: s.dotted })),
          ...bands.map((s): LegendItem => ({ label: s.label, color: toneColor(c, s.tone), mark: 'band' })),
          ...markers.map((m): LegendItem => ({ label: m.label, color: toneColor(c, m.tone), mark: 'marker' })),
        ]}
      />
      <Text variant="small" tone="muted" testID={`${testID}-summary`}>
        {summary}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
});
