import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useUpdateSite } from '../../hooks/use-update-site';
import { space } from '../../theme';
import { Button, Card, Field, Text } from '../ui';

/** The site's currency: every price, cost and profit on every screen is shown in it. Admins change it. */
export function CurrencyCard({ currency, canChange }: { currency: string | undefined; canChange: boolean }) {
  const [code, setCode] = useState(currency ?? '');
  const { submit, error, isBusy } = useUpdateSite();
  const [saved, setSaved] = useState(false);
  return (
    <Card testID="site-currency">
      <Text weight="semibold">Currency: {currency ?? '–'}</Text>
      <Text variant="small" tone="muted">
        Prices, heating cost and profit are shown in it everywhere. Changing it converts nothing: enter recipe prices in the new currency.
      </Text>
      {canChange ? (
        <View style={styles.row}>
          <View style={styles.field}>
            <Field
              label="ISO 4217 code"
              value={code}
              onChangeText={(s) => {
                setCode(s);
                setSaved(false);
              }}
              autoCapitalize="characters"
              maxLength={3}
              error={error?.fields.currency ?? (error && !error.fields.currency ? error.message : undefined)}
              testID="site-currency-code"
            />
          </View>
          <Button
            label="Save currency"
            variant="secondary"
            isBusy={isBusy}
            disabled={!currency || code.trim().toUpperCase() === currency}
            onPress={async () => setSaved(!!(await submit({ currency: code })))}
            testID="site-currency-save"
          />
        </View>
      ) : null}
      {saved ? (
        <Text variant="small" tone="success" accessibilityLiveRegion="polite">
          Saved: amounts now show {currency}.
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', gap: space.sm }, field: { width: 160 } });
