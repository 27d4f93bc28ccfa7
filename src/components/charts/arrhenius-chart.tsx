import { Circle, G, Line } from 'react-native-svg';
import { useColors } from '../../theme';
import { arrheniusGeometry, type ArrheniusInput } from './arrhenius-geometry';
import { View } from 'react-native';
import { ChartFrame, Legend, useSeriesColors } from './chart-frame';

/** ln kd against 1000/T: dots from each temperature on its own (two-step), line from the one-step fit. */
export function ArrheniusChart({ input }: { input: ArrheniusInput }) {
  const c = useColors();
  const colors = useSeriesColors();
  // Same colour per temperature as the decay chart, which colours every temperature in order.
  const all = input.perTemperature.map((p) => p.c).sort((a, b) => a - b);
  const colorOf = (c: number) => colors[all.indexOf(c) % colors.length]!;
  const temps = input.perTemperature.filter((p) => p.kdPerH > 0).map((p) => p.c);
  return (
    <View>
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
                {g.dots.map((d) => (
                  <Circle key={d.c} cx={d.x} cy={d.y} r={5} fill={colorOf(d.c)} />
                ))}
              </G>
            ),
          };
        }}
      />
      <Legend items={[...temps.map((t) => ({ label: `${t} °C`, color: colorOf(t) })), { label: 'one-step fit', color: c.textMuted }]} />
    </View>
  );
}
