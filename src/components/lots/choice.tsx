import { StyleSheet, View } from 'react-native';
import { space } from '../../theme';
import { Button } from '../ui';
import { Text } from '../ui/text';

/** A row of mutually exclusive options (radio group) as compact buttons. */
export function Choice<V extends string>({ label, value, options, onChange, testID }: { label: string; value: V; options: readonly { value: V; label: string }[]; onChange: (v: V) => void; testID?: string }) {
  return (
    <View style={styles.wrap}>
      <Text variant="small" weight="semibold">
        {label}
      </Text>
      <View role="radiogroup" aria-label={label} style={styles.row} testID={testID}>
        {options.map((o) => (
          <Button
            key={o.value}
            label={o.label}
            compact
            variant={o.value === value ? 'primary' : 'secondary'}
            accessibilityRole="radio"
            accessibilityState={{ checked: o.value === value }}
            aria-checked={o.value === value}
            onPress={() => onChange(o.value)}
            testID={testID ? `${testID}-${o.value}` : undefined}
          />
        ))}
      </View>
    </View>
  );
}

/** A typed number field's text as a number; blank or junk becomes NaN, which the API reports as "Enter a number". */
export const toNumber = (s: string) => (s.trim() === '' ? NaN : Number(s.replace(',', '.')));

const styles = StyleSheet.create({ wrap: { gap: space.xs }, row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
