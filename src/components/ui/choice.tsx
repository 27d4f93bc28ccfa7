import { StyleSheet, View } from 'react-native';
import { space } from '../../theme';
import { Button } from './button';
import { Text } from './text';

type Props<T extends string | number> = { label: string; value: T; options: { value: T; label: string }[]; onChange: (v: T) => void; testID: string };

/** One of a few options as a row of buttons, the chosen one filled. */
export function Choice<T extends string | number>({ label, value, options, onChange, testID }: Props<T>) {
  return (
    <View style={styles.wrap} testID={testID}>
      <Text variant="small" weight="semibold">
        {label}
      </Text>
      <View style={styles.row} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {options.map((o) => (
          <Button
            key={String(o.value)}
            label={o.label}
            variant={o.value === value ? 'primary' : 'secondary'}
            accessibilityRole="radio"
            accessibilityState={{ checked: o.value === value }}
            testID={`${testID}-${o.value}`}
            onPress={() => onChange(o.value)}
          />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: space.xs }, row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
