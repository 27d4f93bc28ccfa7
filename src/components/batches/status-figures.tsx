import { StyleSheet, View } from 'react-native';
import type { BatchStatus } from '../../contracts/batches';
import { fmt } from '../../format';
import { radius, space, useBreakpoint, useColors } from '../../theme';
import { Text } from '../ui/text';

function Figure({ label, value, detail, testID, tone }: { label: string; value: string; detail?: string; testID: string; tone?: 'danger' | 'default' }) {
  const c = useColors();
  return (
    <View style={[styles.figure, { borderColor: c.border, backgroundColor: c.surface }]}>
      <Text variant="small" tone="muted">
        {label}
      </Text>
      <Text variant="title" weight="bold" tone={tone ?? 'default'} testID={testID}>
        {value}
      </Text>
      {detail ? (
        <Text variant="caption" tone="muted">
          {detail}
        </Text>
      ) : null}
    </View>
  );
}

/** The batch's key numbers from the engine: forecast, product so far, activity left, dose, plan now. */
export function StatusFigures({ status, isPreview }: { status: BatchStatus; isPreview: boolean }) {
  const { isWide } = useBreakpoint();
  const low = status.p10GPerL !== null && status.forecastGPerL < status.p10GPerL;
  return (
    <View style={[styles.grid]} testID="status-figures">
      <View style={[styles.cell, isWide && styles.cellWide]}>
        <Figure
          label={isPreview ? 'Forecast at the end (preview)' : 'Forecast at the end'}
          value={`${fmt(status.forecastGPerL)} g/L`}
          detail={`plan ${fmt(status.plannedProductGPerL)}${status.p10GPerL !== null ? ` · P10 ${fmt(status.p10GPerL)}` : ''}`}
          testID="figure-forecast"
          tone={low ? 'danger' : 'default'}
        />
      </View>
      <View style={[styles.cell, isWide && styles.cellWide]}>
        <Figure label="Product so far" value={`${fmt(status.productSoFarGPerL)} g/L`} detail={`at hour ${fmt(status.lastH)}`} testID="figure-product" />
      </View>
      <View style={[styles.cell, isWide && styles.cellWide]}>
        <Figure label="Activity left" value={`${fmt(status.activityLeft * 100, 0)} %`} detail={`${fmt(status.forecastActivityLeft * 100, 0)} % at the end`} testID="figure-activity" />
      </View>
      <View style={[styles.cell, isWide && styles.cellWide]}>
        <Figure label="Thermal dose" value={`${fmt(status.equivalentHAtRef, 2)} h`} detail={`equivalent at ${fmt(status.refC, 0)} °C`} testID="figure-dose" />
      </View>
      <View style={[styles.cell, isWide && styles.cellWide]}>
        <Figure label="Planned now" value={`${fmt(status.plannedNowC)} °C`} detail={`${fmt(status.hoursLeft)} h left`} testID="figure-planned-now" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  cell: { flexBasis: '47%', flexGrow: 1 },
  cellWide: { flexBasis: '18%' },
  figure: { borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: space.xxs },
});
