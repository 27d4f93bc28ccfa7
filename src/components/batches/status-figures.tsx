import { StyleSheet, View } from 'react-native';
import type { BatchStatus } from '../../contracts/batches';
import { fmt } from '../../format';
import { space } from '../../theme';
import { Figure } from '../ui/figure';
import { Text } from '../ui/text';

/** The batch's key numbers from the engine: forecast, product so far, activity left, dose, plan now. */
export function StatusFigures({ status, isPreview }: { status: BatchStatus; isPreview: boolean }) {
  const low = status.p10GPerL !== null && status.forecastGPerL < status.p10GPerL;
  return (
    <View style={styles.wrap}>
      <View style={styles.grid} testID="status-figures">
        <Figure
          label={`${isPreview ? 'Forecast at the end (preview)' : 'Forecast at the end'} · plan ${fmt(status.plannedProductGPerL)}${status.p10GPerL !== null ? `, P10 ${fmt(status.p10GPerL)}` : ''}`}
          value={`${fmt(status.forecastGPerL)} g/L`}
          testID="figure-forecast"
        />
        <Figure label={`Product so far, at hour ${fmt(status.lastH)}`} value={`${fmt(status.productSoFarGPerL)} g/L`} testID="figure-product" />
        <Figure
          label={`Activity left · ${fmt(status.forecastActivityLeft * 100, 0)} % at the end`}
          value={`${fmt(status.activityLeft * 100, 0)} %`}
          testID="figure-activity"
        />
        <Figure label={`Thermal dose, h equivalent at ${fmt(status.refC, 0)} °C`} value={fmt(status.equivalentHAtRef, 2)} testID="figure-dose" />
        <Figure label={`Planned now · ${fmt(status.hoursLeft)} h left`} value={`${fmt(status.plannedNowC)} °C`} testID="figure-planned-now" />
      </View>
      {low ? (
        <Text tone="danger" weight="semibold" testID="forecast-below-p10">
          The forecast is below the plan’s P10: the batch is heading for one of its worst outcomes.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
