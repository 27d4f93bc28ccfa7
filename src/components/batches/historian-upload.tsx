import * as DocumentPicker from 'expo-document-picker';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { ImportResult } from '../../contracts/batches';
import { useImportProgress } from '../../hooks/use-import-progress';
import { useImportReadings } from '../../hooks/use-import-readings';
import { space } from '../../theme';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { ProgressBar } from '../ui/progress-bar';
import { Text } from '../ui/text';

const KIND = { invalid: 'not read', duplicate: 'duplicate', already_stored: 'already stored', out_of_order: 'out of order' } as const;

/** Upload of a historian export (time, °C); local times are read in the site's zone. */
export function HistorianUpload({ batchId, siteTimeZone }: { batchId: number; siteTimeZone: string }) {
  const upload = useImportReadings(batchId);
  const [result, setResult] = useState<ImportResult | null>(null);
  const progress = useImportProgress(batchId, upload.isBusy);
  async function pick() {
    const picked = await DocumentPicker.getDocumentAsync({
      type: ['text/csv', 'text/comma-separated-values', 'text/plain', 'application/vnd.ms-excel'],
      base64: false,
    });
    if (picked.canceled || !picked.assets[0]) return;
    const asset = picked.assets[0];
    const text = asset.file ? await asset.file.text() : await (await fetch(asset.uri)).text();
    setResult(await upload.submit(text));
  }
  return (
    <Card testID="historian-upload">
      <Text variant="title" accessibilityRole="header">
        Historian export
      </Text>
      <Text variant="small" tone="muted">
        A CSV of time and °C. Times without a zone are read as {siteTimeZone}; day.month.year, ISO and Unix times are understood. Rows already stored are
        skipped.
      </Text>
      <Button label="Upload CSV" variant="secondary" isBusy={upload.isBusy} onPress={() => void pick()} testID="historian-upload-button" />
      {progress?.isRunning ? (
        <View style={styles.result} testID="historian-progress">
          <ProgressBar
            value={
              progress.phase === 'storing' ? progress.rowsStored / Math.max(1, progress.rowsToStore) : progress.bytesRead / Math.max(1, progress.bytesTotal)
            }
            label="Historian import progress"
          />
          <Text variant="small" tone="muted" accessibilityLiveRegion="polite">
            {progress.phase === 'storing'
              ? `Storing: ${progress.rowsStored.toLocaleString('en')} of ${progress.rowsToStore.toLocaleString('en')} readings`
              : `Reading the file: ${Math.round((100 * progress.bytesRead) / Math.max(1, progress.bytesTotal))} % of ${(progress.bytesTotal / 1e6).toFixed(1)} MB`}
          </Text>
        </View>
      ) : null}
      {upload.error ? (
        <Text variant="small" tone="danger">
          {upload.error.message}
        </Text>
      ) : null}
      {result ? (
        <View style={styles.result} testID="historian-result">
          <Text variant="small" weight="semibold">
            {result.imported} of {result.rows} rows stored · {result.skipped} skipped · {result.outOfOrder} out of order · {result.deviationsRaised} deviations
            raised
          </Text>
          {result.problems.slice(0, 20).map((p) => (
            <Text key={`${p.line}-${p.kind}`} variant="caption" tone={p.kind === 'out_of_order' ? 'warning' : 'danger'}>
              Line {p.line} ({KIND[p.kind]}): {p.message}
            </Text>
          ))}
          {result.problems.length > 20 ? (
            <Text variant="caption" tone="muted">
              …and {result.skipped + result.outOfOrder - 20} more.
            </Text>
          ) : null}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ result: { gap: space.xxs } });
