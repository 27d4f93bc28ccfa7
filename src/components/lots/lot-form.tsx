import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Enzyme } from '../../contracts/enzymes';
import type { CertForm, CertStability, Lot } from '../../contracts/lots';
import { useCreateLot } from '../../hooks/use-create-lot';
import { certConversion } from '../../stability';
import { space, useBreakpoint } from '../../theme';
import { Button, Card, Field, Text } from '../ui';
import { toNumber } from '../../format';
import { Choice } from '../ui/choice';

const FORMS = [
  { value: 'halfLife', label: 'Half-life' },
  { value: 'residual', label: 'Residual after time' },
  { value: 'dValue', label: 'D-value and z' },
] as const;

const today = () => new Date().toISOString().slice(0, 10);

function stabilityOf(form: CertForm, v: Record<string, string>): CertStability {
  const tempC = toNumber(v.tempC ?? '');
  if (form === 'halfLife') return { form, tempC, halfLifeH: toNumber(v.halfLifeH ?? '') };
  if (form === 'residual') return { form, tempC, minutes: toNumber(v.minutes ?? ''), residualFraction: toNumber(v.residualFraction ?? '') };
  return { form, tempC, dMinutes: toNumber(v.dMinutes ?? ''), zC: toNumber(v.zC ?? '') };
}

/** Registering an incoming lot: the certificate's figures, with its stability converted to kd as the user types. */
export function LotForm({ enzymes, onDone }: { enzymes: Enzyme[]; onDone: (lot: Lot) => void }) {
  const { isWide } = useBreakpoint();
  const { submit, error, isBusy } = useCreateLot();
  const [enzymeId, setEnzymeId] = useState(String(enzymes[0]?.id ?? ''));
  const enzyme = enzymes.find((e) => String(e.id) === enzymeId);
  const [v, setV] = useState<Record<string, string>>({ receivedOn: today(), tempC: enzyme ? String(enzyme.specTempC) : '' });
  const [form, setForm] = useState<CertForm>('halfLife');
  const set = (k: string) => (text: string) => setV((old) => ({ ...old, [k]: text }));
  const f = error?.fields ?? {};
  const stability = stabilityOf(form, v);
  const preview = safeConversion(stability);
  const field = (k: string, label: string, extra: Partial<React.ComponentProps<typeof Field>> = {}) => (
    <View style={isWide ? styles.half : styles.full}>
      <Field label={label} value={v[k] ?? ''} onChangeText={set(k)} error={f[k] ?? f[`certStability.${k}`]} testID={`lot-${k}`} {...extra} />
    </View>
  );
  return (
    <Card testID="lot-form">
      <Text variant="title">Register a lot</Text>
      <Choice
        compact
        label="Enzyme"
        value={enzymeId}
        options={enzymes.map((e) => ({ value: String(e.id), label: e.name }))}
        onChange={setEnzymeId}
        testID="lot-enzyme"
      />
      {f.enzymeId ? <Text tone="danger">{f.enzymeId}</Text> : null}
      <View style={styles.grid}>
        {field('lotCode', 'Lot code', { autoCapitalize: 'characters' })}
        {field('quantityKg', 'Quantity, kg', { keyboardType: 'decimal-pad' })}
        {field('receivedOn', 'Received (YYYY-MM-DD)')}
        {field('expiresOn', 'Expires (YYYY-MM-DD)')}
        {field('certActivity', `Certificate activity${enzyme ? `, ${enzyme.activityUnit}` : ''}`, { keyboardType: 'decimal-pad' })}
      </View>
      <Choice compact label="Stability as the certificate states it" value={form} options={FORMS} onChange={setForm} testID="lot-form-kind" />
      <View style={styles.grid}>
        {field('tempC', 'At temperature, °C', { keyboardType: 'decimal-pad' })}
        {form === 'halfLife' ? field('halfLifeH', 'Half-life, h', { keyboardType: 'decimal-pad' }) : null}
        {form === 'residual' ? field('minutes', 'After, min', { keyboardType: 'decimal-pad' }) : null}
        {form === 'residual' ? field('residualFraction', 'Residual activity (fraction, e.g. 0.78)', { keyboardType: 'decimal-pad' }) : null}
        {form === 'dValue' ? field('dMinutes', 'D-value, min', { keyboardType: 'decimal-pad' }) : null}
        {form === 'dValue' ? field('zC', 'z-value, °C', { keyboardType: 'decimal-pad' }) : null}
      </View>
      {preview ? (
        <View accessibilityLiveRegion="polite" testID="lot-conversion">
          <Text variant="small" weight="semibold">
            Converted by the engine
          </Text>
          {preview.steps.map((s) => (
            <Text key={s} variant="small" tone="muted">
              {s}
            </Text>
          ))}
        </View>
      ) : null}
      {error && !Object.keys(f).length ? <Text tone="danger">{error.message}</Text> : null}
      <Button
        label="Register lot (starts quarantined)"
        isBusy={isBusy}
        testID="lot-submit"
        onPress={async () => {
          const lot = await submit({
            enzymeId: Number(enzymeId),
            lotCode: v.lotCode ?? '',
            receivedOn: v.receivedOn ?? '',
            expiresOn: v.expiresOn ?? '',
            quantityKg: toNumber(v.quantityKg ?? ''),
            certActivity: toNumber(v.certActivity ?? ''),
            certStability: stability,
          });
          if (lot) onDone(lot);
        }}
      />
    </Card>
  );
}

function safeConversion(s: CertStability) {
  const nums = Object.values(s).filter((x): x is number => typeof x === 'number');
  if (!nums.every((x) => Number.isFinite(x) && x !== 0)) return null;
  if (s.form === 'residual' && !(s.residualFraction > 0 && s.residualFraction < 1)) return null;
  return certConversion(s);
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  half: { flexBasis: '47%', flexGrow: 1 },
  full: { width: '100%' },
});
