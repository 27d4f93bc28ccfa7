import { Pressable, StyleSheet, View } from 'react-native';
import type { Role } from '../../contracts/roles';
import { ROLE_LABELS, ROLES } from '../../contracts/rules';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Text } from '../ui';

/** One role out of five, as a row of choices (radio group). */
export function RoleChoice({ value, onChange, testID }: { value: Role; onChange: (r: Role) => void; testID: string }) {
  const c = useColors();
  return (
    <View accessibilityRole="radiogroup" accessibilityLabel="Role" style={styles.row} testID={testID}>
      {ROLES.map((r) => {
        const on = r === value;
        return (
          <Pressable
            key={r}
            accessibilityRole="radio"
            accessibilityLabel={ROLE_LABELS[r]}
            accessibilityState={{ checked: on }}
            aria-checked={on}
            testID={`${testID}-${r}`}
            onPress={() => onChange(r)}
            style={[styles.chip, { borderColor: on ? c.primary : c.border, backgroundColor: on ? c.primary : c.surface }]}
          >
            <Text variant="small" weight="semibold" style={{ color: on ? c.onPrimary : c.text }}>
              {ROLE_LABELS[r]}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  chip: { minHeight: touchTarget, paddingHorizontal: space.md, borderRadius: radius.pill, borderWidth: 1, justifyContent: 'center' },
});
