import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fmt, toNumber } from '../../format';
import { useCalibrationSettings, useUpdateCalibrationSettings } from '../../hooks/use-calibration-settings';
import { space } from '../../theme';
import { Button, Card, ErrorState, Field, Text } from '../ui';

/** The site's measurement spread for calibration in words; the admin changes it here. */
export function MeasurementSdCard({ canChange }: { canChange: boolean }) {
  const { data, error, retry } = useCalibrationSettings();
  const update = useUpdateCalibrationSettings();
  const [draft, setDraft] = useState<string | null>(null);
  if (error) return <ErrorState error={error} onRetry={retry} />;
  // Drawn before the setting has loaded (and so in the page's HTML snapshot), with a dash for the value.
  const save = async () => {
    if (draft === null) return;
    if (await update.submit({ measurementRelSd: toNumber(draft) / 100 })) setDraft(null);
  };
  return (
    <Card testID="measurement-sd">
      <Text variant="title" accessibilityRole="header">
        Calibration
      </Text>
      <Text testID={data ? 'measurement-sd-sentence' : undefined}>
        A lab result of a closed batch counts in calibration with a standard deviation of {data ? fmt(data.measurementRelSd * 100) : '–'} % of the measured
        product.
      </Text>
      <Text variant="small" tone="muted">
        Set it from the lab’s own replicate measurements; new proposals use it, earlier ones state the value they used.
      </Text>
      {draft !== null ? (
        <>
          <Field
            label="Measurement standard deviation, % of the product"
            value={draft}
            onChangeText={setDraft}
            inputMode="decimal"
            // The API checks the fraction; the field shows per cent.
            error={update.error?.fields.measurementRelSd ? 'Between 0.1 and 20 %' : undefined}
            testID="measurement-sd-input"
          />
          {update.error && !update.error.fields.measurementRelSd ? <Text tone="danger">{update.error.message}</Text> : null}
          <View style={styles.actions}>
            <Button label="Save" onPress={save} isBusy={update.isBusy} testID="measurement-sd-save" />
            <Button label="Cancel" variant="ghost" onPress={() => (setDraft(null), update.clearError())} />
          </View>
        </>
      ) : canChange ? (
        <View style={styles.actions}>
          <Button
            label="Change the measurement spread"
            variant="secondary"
            disabled={!data}
            onPress={() => data && setDraft(String(Number((data.measurementRelSd * 100).toFixed(2))))}
            testID="measurement-sd-edit"
          />
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
