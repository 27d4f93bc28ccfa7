import { Circle, G, Line } from 'react-native-svg';
import { useColors } from '../../theme';
import { ChartFrame, Legend, useSeriesColors } from './chart-frame';
import { forecastAccuracyGeometry, type AccuracyPoint } from './forecast-accuracy-geometry';

type Props = {
  points: AccuracyPoint[];
  label: string;
  /** Legend label of each point group, by its `group` index. */
  groups?: string[];
  xTitle?: string;
  testID?: string;
};

/** Measured product against a forecast, one dot a batch (per group), with the line of perfect forecasts. */
export function ForecastAccuracyChart({
  points,
  label,
  groups = ['Closed batch'],
  xTitle = 'Forecast at closing, g/L',
  testID = 'forecast-accuracy-chart',
}: Props) {
  const c = useColors();
  const colors = useSeriesColors();
  return (
    <>
      <ChartFrame
        label={label}
        xTitle={xTitle}
        yTitle="Measured, g/L"
        testID={testID}
        render={(w, h) => {
          const g = forecastAccuracyGeometry(points, w, h);
          return {
            ...g,
            marks: (
              <G>
                <Line {...g.diagonal} stroke={c.textMuted} strokeWidth={1} strokeDasharray="4 4" />
                {g.dots.map((d) => (
                  <Circle key={`${d.p.group ?? 0}-${d.p.id}`} cx={d.x} cy={d.y} r={5} fill={colors[(d.p.group ?? 0) % colors.length]} fillOpacity={0.85} />
                ))}
              </G>
            ),
          };
        }}
      />
      <Legend items={[...groups.map((label, i) => ({ label, color: colors[i % colors.length]! })), { label: 'Measured = forecast', color: c.textMuted }]} />
    </>
  );
}
