import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fmt, toNumber } from '../../format';
import { useBatchSettings, useUpdateBatchSettings } from '../../hooks/use-batch-settings';
import { space } from '../../theme';
import { Button, Card, ErrorState, Field, Loader, Text } from '../ui';

/** The site's deviation rules in words, for everyone on the floor; supervisors and admins change them here. */
export function DeviationRulesCard({ canChange }: { canChange: boolean }) {
  const { data, error, retry } = useBatchSettings();
  const update = useUpdateBatchSettings();
  const [draft, setDraft] = useState<{ toleranceC: string; gapLimitMin: string } | null>(null);
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (!data) return <Loader rows={1} label="Loading the deviation rules" />;
  const save = async () => {
    if (!draft) return;
    if (await update.submit({ toleranceC: toNumber(draft.toleranceC), gapLimitMin: toNumber(draft.gapLimitMin) })) setDraft(null);
  };
  return (
    <Card testID="deviation-rules">
      <Text variant="title" accessibilityRole="header">
        Deviation rules
      </Text>
      <Text testID="deviation-rules-sentence">
        A reading more than {fmt(data.toleranceC)} °C from the plan, or no reading for {data.gapLimitMin} min, raises a deviation on every running batch.
      </Text>
      {draft ? (
        <>
          <Field
            label="Band around the plan, ± °C"
            value={draft.toleranceC}
            onChangeText={(v) => setDraft({ ...draft, toleranceC: v })}
            inputMode="decimal"
            error={update.error?.fields.toleranceC}
            testID="rules-toleranceC"
          />
          <Field
            label="Longest gap between readings, min"
            value={draft.gapLimitMin}
            onChangeText={(v) => setDraft({ ...draft, gapLimitMin: v })}
            inputMode="numeric"
            error={update.error?.fields.gapLimitMin}
            testID="rules-gapLimitMin"
          />
          {update.error && !Object.keys(update.error.fields).length ? <Text tone="danger">{update.error.message}</Text> : null}
          <View style={styles.actions}>
            <Button label="Save rules" onPress={save} isBusy={update.isBusy} testID="rules-save" />
            <Button label="Cancel" variant="ghost" onPress={() => (setDraft(null), update.clearError())} />
          </View>
        </>
      ) : canChange ? (
        <View style={styles.actions}>
          <Button
            label="Change the rules"
            variant="secondary"
            onPress={() => setDraft({ toleranceC: String(data.toleranceC), gapLimitMin: String(data.gapLimitMin) })}
            testID="rules-edit"
          />
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
