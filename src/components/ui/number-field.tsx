import { memo, useEffect, useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { font, radius, space, touchTarget, type as typeScale, useColors } from '../../theme';
import { isBuildSnapshot } from '../../web/snapshot';
import { FieldNote } from './field';
import { Text } from './text';

type Props = {
  label: string;
  value: number;
  onChange: (v: number) => void;
  step: number;
  min: number;
  max: number;
  unit?: string;
  decimals?: number;
  hint?: string;
  testID: string;
};

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));

/** A number with − and + buttons: typing applies as soon as the text is a number in range. Memoised: pass a stable onChange. */
export const NumberField = memo(function NumberField({ label, value, onChange, step, min, max, unit, decimals = 1, hint, testID }: Props) {
  const c = useColors();
  const shown = (v: number) => String(Number(v.toFixed(decimals)));
  // What one tap of − or + does, shown under the field (the unit as the label gives it).
  const stepNote = `− / + by ${shown(step)}${unit ? ` ${unit}` : ''}`;
  const [text, setText] = useState(shown(value));
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    if (Number(text) !== value) setText(shown(value));
    // Only an outside change of the value rewrites the text, never the user's own typing.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [value]);
  const apply = (t: string) => {
    setText(t);
    const v = Number(t.replace(',', '.'));
    if (t.trim() === '' || !Number.isFinite(v)) return setError('Enter a number');
    if (v < min || v > max) return setError(`Between ${shown(min)} and ${shown(max)}`);
    setError(null);
    onChange(v);
  };
  const bump = (dir: 1 | -1) => {
    const v = clamp(Number((value + dir * step).toFixed(6)), min, max);
    setError(null);
    setText(shown(v));
    onChange(v);
  };
  const button = (dir: 1 | -1) => (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={`${dir > 0 ? 'Increase' : 'Decrease'} ${label.toLowerCase()} by ${shown(step)}${unit ? ` ${unit}` : ''}`}
      testID={`${testID}-${dir > 0 ? 'increase' : 'decrease'}`}
      onPress={() => bump(dir)}
      disabled={dir > 0 ? value >= max : value <= min}
      style={({ pressed }) => [styles.button, { borderColor: c.border, backgroundColor: c.surfaceRaised }, pressed && { opacity: 0.7 }]}
    >
      <Text weight="semibold" tone="primary">
        {dir > 0 ? '+' : '−'}
      </Text>
    </Pressable>
  );
  return (
    <View style={styles.wrap}>
      <Text variant="small" weight="semibold">
        {label}
        {unit ? <Text variant="small" tone="muted">{` (${unit})`}</Text> : null}
      </Text>
      <View style={styles.row}>
        {button(-1)}
        <TextInput
          accessibilityLabel={unit ? `${label} in ${unit}` : label}
          testID={testID}
          value={text}
          onChangeText={apply}
          onBlur={() => setText(shown(value))}
          inputMode="decimal"
          editable={!isBuildSnapshot}
          style={[styles.input, { color: c.text, backgroundColor: c.surface, borderColor: error ? c.danger : c.border, fontFamily: font.regular }]}
        />
        {button(1)}
      </View>
      <FieldNote error={error} hint={hint ? `${hint} · ${stepNote}` : stepNote} />
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: space.xs, flexGrow: 1, flexBasis: 150 },
  row: { flexDirection: 'row', gap: space.xs },
  input: {
    flex: 1,
    minWidth: 0,
    minHeight: touchTarget,
    borderWidth: 1,
    borderRadius: radius.md,
    paddingHorizontal: space.sm,
    textAlign: 'center',
    ...typeScale.body,
  },
  button: { width: touchTarget, height: touchTarget, borderWidth: 1, borderRadius: radius.md, alignItems: 'center', justifyContent: 'center' },
});
