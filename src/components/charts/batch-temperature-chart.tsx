import { Circle, G, Line, Path, Rect } from 'react-native-svg';
import { useColors } from '../../theme';
import { batchTemperatureGeometry, type BatchTemperatureInput } from './batch-temperature-geometry';
import { ChartFrame, Legend } from './chart-frame';

/** Logged temperature over the planned program and its tolerance band; the caller shows the text equivalent. */
export function BatchTemperatureChart({ input, label }: { input: BatchTemperatureInput; label: string }) {
  const c = useColors();
  return (
    <>
      <ChartFrame
        label={label}
        xTitle="Batch time, h"
        yTitle="°C"
        testID="batch-temperature-chart"
        render={(w, h) => {
          const g = batchTemperatureGeometry(input, w, h);
          return {
            ...g,
            marks: (
              <G>
                {g.gapSpans.map((s, i) => (
                  <Rect key={`gap${i}`} x={s.x0} y={g.box.top} width={s.x1 - s.x0} height={g.box.bottom - g.box.top} fill={c.warning} opacity={0.18} />
                ))}
                <Path d={g.bandPath} fill={c.chartLine} opacity={0.12} />
                <Path d={g.planPath} stroke={c.chartLine} strokeWidth={2} strokeDasharray="6 4" fill="none" />
                {g.vesselMaxY !== null ? (
                  <Line x1={g.box.left} x2={g.box.right} y1={g.vesselMaxY} y2={g.vesselMaxY} stroke={c.danger} strokeWidth={1.5} strokeDasharray="2 3" />
                ) : null}
                {g.nowX !== null ? <Line x1={g.nowX} x2={g.nowX} y1={g.box.top} y2={g.box.bottom} stroke={c.textMuted} strokeWidth={1} /> : null}
                {g.loggedPaths.map((d, i) => (
                  <Path key={i} d={d} stroke={c.chartLineAlt} strokeWidth={2} fill="none" />
                ))}
                {g.controlPaths.map((d, i) => (
                  <Path key={`cs${i}`} d={d} stroke={c.primary} strokeWidth={1.5} fill="none" />
                ))}
                {g.dots.map((d, i) =>
                  d.isControl ? (
                    <Rect key={i} x={d.x - 2.5} y={d.y - 2.5} width={5} height={5} fill={d.isOutside ? c.danger : c.primary} />
                  ) : (
                    <Circle
                      key={i}
                      cx={d.x}
                      cy={d.y}
                      r={d.isOutside ? 5 : 3.5}
                      fill={d.isQueued ? c.surface : d.isOutside ? c.danger : c.chartLineAlt}
                      stroke={d.isOutside ? c.danger : c.chartLineAlt}
                      strokeWidth={1.5}
                    />
                  ),
                )}
              </G>
            ),
          };
        }}
      />
      <Legend
        items={[
          { label: `Plan ±${input.toleranceC} °C`, color: c.chartLine },
          { label: 'Logged', color: c.chartLineAlt },
          ...(input.readings.some((r) => r.isControl) ? [{ label: 'Control system', color: c.primary }] : []),
          ...(input.gaps?.length ? [{ label: 'Link gap, no history', color: c.warning }] : []),
          { label: 'Outside the band / vessel maximum', color: c.danger },
        ]}
      />
    </>
  );
}
