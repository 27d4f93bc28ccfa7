import { Circle, G, Path } from 'react-native-svg';
import { View } from 'react-native';
import { ChartFrame, Legend, useSeriesColors } from './chart-frame';
import { decayGeometry, type DecayFit, type DecayPoint } from './decay-geometry';

/** Residual activity against time, one colour per temperature, dots measured and lines fitted. */
export function DecayChart({ points, fit }: { points: DecayPoint[]; fit: DecayFit | null }) {
  const colors = useSeriesColors();
  const temps = [...new Set(points.map((p) => p.tempC))].sort((a, b) => a - b);
  return (
    <View>
      <ChartFrame
        testID="decay-chart"
        label={`Residual activity against time at ${temps.join(', ')} °C${fit ? ', with fitted first-order curves' : ''}. The table below lists the same data.`}
        xTitle="time, h"
        yTitle="residual activity (fraction)"
        render={(w, h) => {
          const g = decayGeometry(points, fit, w, h);
          return {
            ...g,
            marks: g.series.map((s, i) => (
              <G key={s.tempC}>
                {s.curve ? <Path d={s.curve} stroke={colors[i % colors.length]} strokeWidth={2} fill="none" /> : null}
                {s.dots.map((d, j) => (
                  <Circle key={j} cx={d.x} cy={d.y} r={3.5} fill={colors[i % colors.length]} />
                ))}
              </G>
            )),
          };
        }}
      />
      <Legend items={temps.map((t, i) => ({ label: `${t} °C`, color: colors[i % colors.length]! }))} />
    </View>
  );
}
