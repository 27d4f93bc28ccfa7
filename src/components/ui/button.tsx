import { ActivityIndicator, Pressable, StyleSheet, View, type PressableProps } from 'react-native';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Text } from './text';

type Variant = 'primary' | 'secondary' | 'ghost' | 'danger';

export type ButtonProps = Omit<PressableProps, 'children' | 'style'> & {
  label: string;
  variant?: Variant;
  isBusy?: boolean;
  icon?: React.ReactNode;
  compact?: boolean;
};

export function Button({ label, variant = 'primary', isBusy, disabled, icon, compact, accessibilityLabel, ...rest }: ButtonProps) {
  const c = useColors();
  const bg = { primary: c.primary, secondary: c.surface, ghost: 'transparent', danger: c.danger }[variant];
  const fg = { primary: c.onPrimary, secondary: c.primary, ghost: c.primary, danger: c.onDanger }[variant];
  const isDisabled = disabled || isBusy;
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!isDisabled, busy: !!isBusy }}
      disabled={isDisabled}
      {...rest}
      style={({ pressed }) => [
        styles.base,
        compact && styles.compact,
        { backgroundColor: bg, borderColor: variant === 'secondary' ? c.border : bg },
        pressed && !isDisabled && { opacity: 0.85 },
        isDisabled && { opacity: 0.55 },
      ]}
    >
      <View style={styles.row}>
        {isBusy ? <ActivityIndicator color={fg} size="small" /> : icon}
        <Text weight="semibold" style={{ color: fg }}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: { minHeight: touchTarget, paddingHorizontal: space.lg, borderRadius: radius.md, borderWidth: 1, justifyContent: 'center' },
  compact: { minHeight: 36, paddingHorizontal: space.md },
  row: { flexDirection: 'row', alignItems: 'center', justifyContent: 'center', gap: space.sm },
});
