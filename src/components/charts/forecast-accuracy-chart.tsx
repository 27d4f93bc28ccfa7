import { Circle, G, Line } from 'react-native-svg';
import { useColors } from '../../theme';
import { ChartFrame, Legend } from './chart-frame';
import { forecastAccuracyGeometry, type AccuracyPoint } from './forecast-accuracy-geometry';

/** Measured product against the forecast at closing, one dot a batch, with the line of perfect forecasts. */
export function ForecastAccuracyChart({ points, label }: { points: AccuracyPoint[]; label: string }) {
  const c = useColors();
  return (
    <>
      <ChartFrame
        label={label}
        xTitle="Forecast at closing, g/L"
        yTitle="Measured, g/L"
        testID="forecast-accuracy-chart"
        render={(w, h) => {
          const g = forecastAccuracyGeometry(points, w, h);
          return {
            box: g.box,
            xTicks: g.xTicks,
            yTicks: g.yTicks,
            marks: (
              <G>
                <Line {...g.diagonal} stroke={c.textMuted} strokeWidth={1} strokeDasharray="4 4" />
                {g.dots.map((d) => (
                  <Circle key={d.p.id} cx={d.x} cy={d.y} r={5} fill={c.chartLine} />
                ))}
              </G>
            ),
          };
        }}
      />
      <Legend items={[{ label: 'Closed batch', color: c.chartLine }, { label: 'Measured = forecast', color: c.textMuted }]} />
    </>
  );
}
