import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Vessel, VesselInput } from '../../contracts/vessels';
import { useSaveVessel } from '../../hooks/use-save-vessel';
import { space } from '../../theme';
import { Button, Card, Field, Text } from '../ui';

const FIELDS: { key: keyof VesselInput; label: string; unit?: string }[] = [
  { key: 'name', label: 'Name' },
  { key: 'workingVolumeL', label: 'Working volume', unit: 'L' },
  { key: 'minC', label: 'Minimum temperature', unit: '°C' },
  { key: 'maxC', label: 'Maximum temperature', unit: '°C' },
  { key: 'maxHeatCPerH', label: 'Largest heating rate', unit: '°C/h' },
  { key: 'maxCoolCPerH', label: 'Largest cooling rate', unit: '°C/h' },
  { key: 'hygienicMinC', label: 'Hygienic minimum', unit: '°C' },
];

const EMPTY: Record<keyof VesselInput, string> = { name: '', workingVolumeL: '', minC: '', maxC: '', maxHeatCPerH: '', maxCoolCPerH: '', hygienicMinC: '' };

/** Add or change a vessel; the server checks the limits (range, hygienic minimum inside it, positive rates). */
export function VesselForm({ vessel, onDone }: { vessel: Vessel | null; onDone: () => void }) {
  const [text, setText] = useState<Record<keyof VesselInput, string>>(() =>
    vessel ? (Object.fromEntries(FIELDS.map((f) => [f.key, String(vessel[f.key])])) as Record<keyof VesselInput, string>) : EMPTY,
  );
  const { submit: save, error, isBusy } = useSaveVessel();
  const submit = async () => {
    const body = Object.fromEntries(FIELDS.map((f) => [f.key, f.key === 'name' ? text.name : Number(text[f.key])])) as VesselInput;
    if (await save(vessel?.id ?? null, body)) onDone();
  };
  return (
    <Card testID="vessel-form">
      <Text variant="title" accessibilityRole="header">
        {vessel ? `Change ${vessel.name}` : 'Add a vessel'}
      </Text>
      <View style={styles.grid}>
        {FIELDS.map((f) => (
          <View key={f.key} style={styles.cell}>
            <Field
              label={f.unit ? `${f.label} (${f.unit})` : f.label}
              value={text[f.key]}
              onChangeText={(v) => setText({ ...text, [f.key]: v })}
              inputMode={f.key === 'name' ? 'text' : 'decimal'}
              error={error?.fields[f.key]}
              testID={`vessel-${f.key}`}
            />
          </View>
        ))}
      </View>
      {error && !Object.keys(error.fields).length ? <Text tone="danger">{error.message}</Text> : null}
      <View style={styles.actions}>
        <Button label={vessel ? 'Save changes' : 'Add vessel'} onPress={submit} isBusy={isBusy} testID="vessel-save" />
        <Button label="Cancel" variant="ghost" onPress={onDone} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  cell: { flexGrow: 1, flexBasis: 200 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
