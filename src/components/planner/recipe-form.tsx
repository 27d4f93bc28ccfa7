import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Recipe, RecipeInput, RecipePatch } from '../../contracts/recipes';
import { fmt, toNumber } from '../../format';
import { useCreateRecipe } from '../../hooks/use-create-recipe';
import { useLots } from '../../hooks/use-lots';
import { useUpdateRecipe } from '../../hooks/use-update-recipe';
import { useVessels } from '../../hooks/use-vessels';
import { space } from '../../theme';
import { Button, Card, Choice, ErrorState, Field, Loader, Text } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

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
  { key: 'productPricePerKg', label: 'Product price (CUR/kg)' },
  { key: 'enzymePricePerKg', label: 'Enzyme price (CUR/kg)' },
  { key: 'heatingCostPerDegCHour', label: 'Heating cost (CUR per °C·h)' },
];

/**
 * A new recipe (an accepted lot in a vessel with its substrate charge, dose and prices), or changes to one. A saved
 * recipe's setpoint is not a field here: it moves only through change control.
 */
export function RecipeForm({ recipe, onDone }: { recipe?: Recipe; onDone: () => void }) {
  const lots = useLots();
  const vessels = useVessels();
  const site = useSiteFormat();
  const create = useCreateRecipe();
  const update = useUpdateRecipe();
  const { error, isBusy } = recipe ? update : create;
  const fields = recipe ? FIELDS.filter((f) => f.key !== 'currentSetpointC') : FIELDS;
  const [name, setName] = useState(recipe?.name ?? '');
  const [lotId, setLotId] = useState<string>(recipe ? String(recipe.lotId) : '');
  const [vesselId, setVesselId] = useState<string>(recipe ? String(recipe.vesselId) : '');
  const [text, setText] = useState<Record<NumberKey, string>>(
    () => Object.fromEntries(FIELDS.map((f) => [f.key, recipe ? String(recipe[f.key]) : ''])) as Record<NumberKey, string>,
  );
  if (lots.error) return <ErrorState error={lots.error} onRetry={lots.retry} />;
  if (vessels.error) return <ErrorState error={vessels.error} onRetry={vessels.retry} />;
  if (!lots.data || !vessels.data) return <Loader rows={4} label="Loading lots and vessels" />;
  const accepted = lots.data.lots.filter((l) => l.status === 'accepted');
  const save = async () => {
    const body = { name, lotId: Number(lotId), vesselId: Number(vesselId), ...Object.fromEntries(fields.map((f) => [f.key, toNumber(text[f.key])])) };
    const saved = recipe ? await update.submit(recipe.id, body as RecipePatch) : await create.submit(body as RecipeInput);
    if (saved) onDone();
  };
  return (
    <Card testID="recipe-form">
      <Text variant="title" accessibilityRole="header">
        {recipe ? `Change ${recipe.name}` : 'New recipe'}
      </Text>
      {recipe ? <Text tone="muted">Setpoint {fmt(recipe.currentSetpointC)} °C: only a signed-off change moves it.</Text> : null}
      <Field label="Name" value={name} onChangeText={setName} error={error?.fields.name} testID="recipe-name" />
      <Choice
        compact
        label="Accepted lot"
        value={lotId}
        options={accepted.map((l) => ({ value: String(l.id), label: `${l.lotCode} · ${l.enzymeName}` }))}
        onChange={setLotId}
        testID="recipe-lot"
      />
      {error?.fields.lotId ? <Text tone="danger">{error.fields.lotId}</Text> : null}
      <Choice
        compact
        label="Vessel"
        value={vesselId}
        options={vessels.data.vessels.map((v) => ({ value: String(v.id), label: v.name }))}
        onChange={setVesselId}
        testID="recipe-vessel"
      />
      {error?.fields.vesselId ? <Text tone="danger">{error.fields.vesselId}</Text> : null}
      <View style={styles.grid}>
        {fields.map((f) => (
          <View key={f.key} style={styles.cell}>
            <Field
              label={f.label.replace('CUR', site.currency)}
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
        <Button label={recipe ? 'Save changes' : 'Add recipe'} onPress={save} isBusy={isBusy} testID="recipe-save" />
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
