import { Circle, G, Line } from 'react-native-svg';
import { useColors } from '../../theme';
import { ChartFrame } from './chart-frame';
import { lotHistoryGeometry, type HistoryPoint } from './lot-history-geometry';

/** Half-life at the specification temperature per lot over time; filled: assay (with interval), hollow: certificate. */
export function LotHistoryChart({ points, specMinHalfLifeH, specTempC }: { points: HistoryPoint[]; specMinHalfLifeH: number; specTempC: number }) {
  const c = useColors();
  return (
    <ChartFrame
      testID="lot-history-chart"
      label={`Half-life at ${specTempC} °C of each lot by date received, against the ${specMinHalfLifeH} h specification. The table below lists the same figures.`}
      xTitle="received"
      yTitle={`half-life at ${specTempC} °C, h`}
      render={(w, h) => {
        const g = lotHistoryGeometry(points, specMinHalfLifeH, w, h);
        return {
          ...g,
          marks: (
            <G>
              <Line x1={g.box.left} x2={g.box.right} y1={g.specY} y2={g.specY} stroke={c.danger} strokeWidth={1.5} strokeDasharray="4 4" />
              {g.marks.map((m) => (
                <G key={m.p.lotCode}>
                  {m.yLow !== null && m.yHigh !== null ? <Line x1={m.x} x2={m.x} y1={m.yLow} y2={m.yHigh} stroke={c.chartLine} strokeWidth={2} /> : null}
                  <Circle cx={m.x} cy={m.y} r={5} stroke={c.chartLine} strokeWidth={2} fill={m.p.basis === 'assay' ? c.chartLine : c.surface} />
                </G>
              ))}
            </G>
          ),
        };
      }}
    />
  );
}
