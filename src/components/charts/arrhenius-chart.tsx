import { Circle, G, Line } from 'react-native-svg';
import { useColors } from '../../theme';
import { arrheniusGeometry, type ArrheniusInput } from './arrhenius-geometry';
import { ChartFrame, useSeriesColors } from './chart-frame';

/** ln kd against 1000/T: dots from each temperature on its own (two-step), line from the one-step fit. */
export function ArrheniusChart({ input }: { input: ArrheniusInput }) {
  const c = useColors();
  const colors = useSeriesColors();
  return (
    <ChartFrame
      testID="arrhenius-chart"
      label="Arrhenius plot: natural log of kd against 1000 over the temperature in kelvin. The table below lists the same figures."
      xTitle="1000 / T, 1/K"
      yTitle="ln kd (kd in 1/h)"
      render={(w, h) => {
        const g = arrheniusGeometry(input, w, h);
        return {
          ...g,
          marks: (
            <G>
              {g.fitLine ? <Line {...g.fitLine} stroke={c.textMuted} strokeWidth={2} strokeDasharray="6 4" /> : null}
              {g.dots.map((d, i) => (
                <Circle key={d.c} cx={d.x} cy={d.y} r={5} fill={colors[i % colors.length]} />
              ))}
            </G>
          ),
        };
      }}
    />
  );
}
