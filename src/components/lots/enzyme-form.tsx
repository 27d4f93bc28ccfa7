import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Enzyme, EnzymeInput } from '../../contracts/enzymes';
import { useSaveEnzyme } from '../../hooks/use-save-enzyme';
import { space, useBreakpoint } from '../../theme';
import { Button, Card, Field, Text } from '../ui';
import { toNumber } from '../../format';

const TEXT_FIELDS = [
  ['name', 'Product name'],
  ['enzymeClass', 'Enzyme class'],
  ['ecNumber', 'EC number'],
  ['supplier', 'Supplier'],
  ['activityUnit', 'Activity unit (e.g. GAU/g)'],
] as const;
const NUMBER_FIELDS = [
  ['tRefC', 'Reference temperature, °C'],
  ['eaKJPerMol', 'Activation energy of catalysis, kJ/mol'],
  ['specTempC', 'Specification temperature, °C'],
  ['specMinHalfLifeH', 'Minimum half-life at that temperature, h'],
  ['specMinActivity', 'Minimum activity'],
] as const;

/** Creating an enzyme product, or editing one when `enzyme` is given. */
export function EnzymeForm({ enzyme, onDone, onCancel }: { enzyme?: Enzyme; onDone: (e: Enzyme) => void; onCancel: () => void }) {
  const { isWide } = useBreakpoint();
  const { submit, error, isBusy } = useSaveEnzyme();
  const [v, setV] = useState<Record<string, string>>(() => (enzyme ? Object.fromEntries(Object.entries(enzyme).map(([k, x]) => [k, String(x)])) : {}));
  const f = error?.fields ?? {};
  const field = (k: string, label: string, numeric: boolean) => (
    <View key={k} style={isWide ? styles.half : styles.full}>
      <Field
        label={label}
        value={v[k] ?? ''}
        onChangeText={(t) => setV((o) => ({ ...o, [k]: t }))}
        error={f[k]}
        keyboardType={numeric ? 'decimal-pad' : 'default'}
        testID={`enzyme-${k}`}
      />
    </View>
  );
  return (
    <Card testID="enzyme-form">
      <Text variant="title">{enzyme ? `Edit ${enzyme.name}` : 'New enzyme product'}</Text>
      <View style={styles.grid}>
        {TEXT_FIELDS.map(([k, label]) => field(k, label, false))}
        {field('unitDefinition', 'Unit definition and assay conditions', false)}
        {NUMBER_FIELDS.map(([k, label]) => field(k, label, true))}
      </View>
      {error && !Object.keys(f).length ? <Text tone="danger">{error.message}</Text> : null}
      <View style={styles.actions}>
        <Button
          label={enzyme ? 'Save changes' : 'Create enzyme'}
          isBusy={isBusy}
          testID="enzyme-submit"
          onPress={async () => {
            const body = Object.fromEntries([
              ...TEXT_FIELDS.map(([k]) => [k, v[k] ?? '']),
              ['unitDefinition', v.unitDefinition ?? ''],
              ...NUMBER_FIELDS.map(([k]) => [k, toNumber(v[k] ?? '')]),
            ]) as EnzymeInput;
            const saved = await submit(body, enzyme?.id);
            if (saved) onDone(saved);
          }}
        />
        <Button label="Cancel" variant="ghost" onPress={onCancel} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  half: { flexBasis: '47%', flexGrow: 1 },
  full: { width: '100%' },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
