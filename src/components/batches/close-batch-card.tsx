import { useState } from 'react';
import type { BatchStatus } from '../../contracts/batches';
import { fmt } from '../../format';
import { useCloseBatch } from '../../hooks/use-close-batch';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field } from '../ui/field';
import { Text } from '../ui/text';

/** Closing records the lab's measured product (optional) beside the forecast at that moment. */
export function CloseBatchCard({ batchId, status, openDeviations }: { batchId: number; status: BatchStatus; openDeviations: number }) {
  const close = useCloseBatch(batchId);
  const [measured, setMeasured] = useState('');
  const [comment, setComment] = useState('');
  const [localError, setLocalError] = useState<string | undefined>();
  function onClose() {
    const t = measured.trim().replace(',', '.');
    const v = t === '' ? null : Number(t);
    if (v !== null && !(Number.isFinite(v) && v >= 0)) return setLocalError('Enter the measured product in g/L, or leave it empty');
    setLocalError(undefined);
    void close.submit({ measuredProductGPerL: v, ...(comment.trim() ? { comment: comment.trim() } : {}) });
  }
  return (
    <Card testID="close-batch">
      <Text variant="title" accessibilityRole="header">
        Close the batch
      </Text>
      <Text variant="small" tone="muted">
        The forecast now is {fmt(status.forecastGPerL)} g/L; it is kept beside the lab result so the site can see how good the forecasts are.
        {openDeviations ? ` Close the ${openDeviations} open deviation${openDeviations > 1 ? 's' : ''} first.` : ''}
      </Text>
      <Field
        label="Measured product, g/L (optional)"
        value={measured}
        onChangeText={setMeasured}
        inputMode="decimal"
        testID="close-measured"
        error={localError ?? close.error?.fields?.measuredProductGPerL}
      />
      <Field label="Comment (optional)" value={comment} onChangeText={setComment} testID="close-comment" />
      {close.error && !close.error.fields?.measuredProductGPerL ? (
        <Text variant="small" tone="danger">
          {close.error.message}
        </Text>
      ) : null}
      <Button label="Close batch" variant="secondary" isBusy={close.isBusy} disabled={openDeviations > 0} onPress={onClose} testID="close-batch-submit" />
    </Card>
  );
}
