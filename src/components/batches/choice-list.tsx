import { Pressable, StyleSheet, View } from 'react-native';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Text } from '../ui/text';

type Option = { value: number; label: string; detail?: string };

/** A labelled group of radio choices as large tappable chips. */
export function ChoiceList({ label, options, value, onChange, error, testID }: { label: string; options: Option[]; value: number | null; onChange: (v: number) => void; error?: string; testID: string }) {
  const c = useColors();
  return (
    <View style={styles.wrap} accessibilityRole="radiogroup" accessibilityLabel={label} testID={testID}>
      <Text variant="small" weight="semibold">
        {label}
      </Text>
      <View style={styles.row}>
        {options.map((o) => {
          const isOn = o.value === value;
          return (
            <Pressable
              key={o.value}
              accessibilityRole="radio"
              accessibilityLabel={o.detail ? `${o.label}, ${o.detail}` : o.label}
              accessibilityState={{ checked: isOn }}
              testID={`${testID}-${o.value}`}
              onPress={() => onChange(o.value)}
              style={[styles.chip, { borderColor: isOn ? c.primary : c.border, backgroundColor: isOn ? c.primary : c.surface }]}
            >
              <Text weight="semibold" variant="small" style={{ color: isOn ? c.onPrimary : c.text }}>
                {o.label}
              </Text>
              {o.detail ? (
                <Text variant="caption" style={{ color: isOn ? c.onPrimary : c.textMuted }}>
                  {o.detail}
                </Text>
              ) : null}
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="small" tone="danger" testID={`${testID}-error`}>
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  chip: { minHeight: touchTarget, paddingHorizontal: space.md, paddingVertical: space.xs, borderWidth: 1, borderRadius: radius.md, justifyContent: 'center' },
});
