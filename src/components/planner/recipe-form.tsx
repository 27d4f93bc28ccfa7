import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { RecipeInput } from '../../contracts/recipes';
import { toNumber } from '../../format';
import { useCreateRecipe } from '../../hooks/use-create-recipe';
import { useLots } from '../../hooks/use-lots';
import { useVessels } from '../../hooks/use-vessels';
import { space } from '../../theme';
import { Button, Card, Choice, ErrorState, Field, Loader, Text } from '../ui';

type NumberKey = Exclude<keyof RecipeInput, 'name' | 'lotId' | 'vesselId'>;

const FIELDS: { key: NumberKey; label: string; hint?: string }[] = [
  { key: 's0GPerL', label: 'Substrate S0 (g/L)' },
  { key: 'kmGPerL', label: 'Km (g/L)' },
  { key: 'doseGPerL', label: 'Enzyme dose (g/L)' },
  { key: 'vmaxRefGPerLH', label: 'Vmax at the reference temperature (g/L/h)', hint: 'At this dose; it scales with the dose' },
  { key: 'edKJPerMol', label: 'Ed, inactivation (kJ/mol)', hint: 'Used until the lot has a fitted value' },
  { key: 'batchH', label: 'Batch length (h)' },
  { key: 'turnaroundH', label: 'Turnaround (h)' },
  { key: 'fillC', label: 'Fill temperature (°C)' },
  { key: 'currentSetpointC', label: 'Current setpoint (°C)', hint: 'After this, only change control moves it' },
  { key: 'productPricePerKg', label: 'Product price (per kg)' },
  { key: 'enzymePricePerKg', label: 'Enzyme price (per kg)' },
  { key: 'heatingCostPerDegCHour', label: 'Heating cost (per °C·h)' },
];

/** A new recipe: an accepted lot in a vessel with its substrate charge, dose and prices. */
export function RecipeForm({ onDone }: { onDone: () => void }) {
  const lots = useLots();
  const vessels = useVessels();
  const { submit, error, isBusy } = useCreateRecipe();
  const [name, setName] = useState('');
  const [lotId, setLotId] = useState<string>('');
  const [vesselId, setVesselId] = useState<string>('');
  const [text, setText] = useState<Record<NumberKey, string>>(() => Object.fromEntries(FIELDS.map((f) => [f.key, ''])) as Record<NumberKey, string>);
  if (lots.error) return <ErrorState error={lots.error} onRetry={lots.retry} />;
  if (vessels.error) return <ErrorState error={vessels.error} onRetry={vessels.retry} />;
  if (!lots.data || !vessels.data) return <Loader rows={4} label="Loading lots and vessels" />;
  const accepted = lots.data.lots.filter((l) => l.status === 'accepted');
  const save = async () => {
    const body = { name, lotId: Number(lotId), vesselId: Number(vesselId), ...Object.fromEntries(FIELDS.map((f) => [f.key, toNumber(text[f.key])])) } as RecipeInput;
    if (await submit(body)) onDone();
  };
  return (
    <Card testID="recipe-form">
      <Text variant="title" accessibilityRole="header">
        New recipe
      </Text>
      <Field label="Name" value={name} onChangeText={setName} error={error?.fields.name} testID="recipe-name" />
      <Choice compact label="Accepted lot" value={lotId} options={accepted.map((l) => ({ value: String(l.id), label: `${l.lotCode} · ${l.enzymeName}` }))} onChange={setLotId} testID="recipe-lot" />
      {error?.fields.lotId ? <Text tone="danger">{error.fields.lotId}</Text> : null}
      <Choice compact label="Vessel" value={vesselId} options={vessels.data.vessels.map((v) => ({ value: String(v.id), label: v.name }))} onChange={setVesselId} testID="recipe-vessel" />
      {error?.fields.vesselId ? <Text tone="danger">{error.fields.vesselId}</Text> : null}
      <View style={styles.grid}>
        {FIELDS.map((f) => (
          <View key={f.key} style={styles.cell}>
            <Field
              label={f.label}
              hint={f.hint}
              value={text[f.key]}
              onChangeText={(v) => setText({ ...text, [f.key]: v })}
              inputMode="decimal"
              error={error?.fields[f.key]}
              testID={`recipe-${f.key}`}
            />
          </View>
        ))}
      </View>
      {error && !Object.keys(error.fields).length ? <Text tone="danger">{error.message}</Text> : null}
      <View style={styles.actions}>
        <Button label="Add recipe" onPress={save} isBusy={isBusy} testID="recipe-save" />
        <Button label="Cancel" variant="ghost" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  cell: { flexGrow: 1, flexBasis: 220 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
