import { StyleSheet, View } from 'react-native';
import { space } from '../../theme';
import { Button } from './button';
import { Text } from './text';

type Props<T extends string | number> = {
  label: string;
  value: T;
  options: readonly { value: T; label: string }[];
  onChange: (v: T) => void;
  testID?: string;
  compact?: boolean;
};

/** One of a few options (a radio group) as a row of buttons, the chosen one filled. */
export function Choice<T extends string | number>({ label, value, options, onChange, testID, compact }: Props<T>) {
  return (
    <View style={styles.wrap} testID={testID}>
      <Text variant="small" weight="semibold">
        {label}
      </Text>
      <View style={styles.row} role="radiogroup" aria-label={label}>
        {options.map((o) => (
          <Button
            key={String(o.value)}
            label={o.label}
            compact={compact}
            variant={o.value === value ? 'primary' : 'secondary'}
            accessibilityRole="radio"
            accessibilityState={{ checked: o.value === value }}
            // react-native-web does not turn accessibilityState.checked into aria-checked for radios.
            aria-checked={o.value === value}
            testID={testID ? `${testID}-${o.value}` : undefined}
            onPress={() => onChange(o.value)}
          />
        ))}
      </View>
    </View>
  );
}

// maxWidth: inside a row of controls a group still wraps its options at the screen's edge instead of running past it.
const styles = StyleSheet.create({ wrap: { gap: space.xs, maxWidth: '100%', flexShrink: 1 }, row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
