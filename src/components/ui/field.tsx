import { useState } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { font, radius, space, touchTarget, type as typeScale, useColors } from '../../theme';
import { isBuildSnapshot } from '../../web/snapshot';
import { Text } from './text';

export type FieldProps = TextInputProps & { label: string; error?: string; hint?: string };

/** A labelled text input with its hint and the API's field error under it. */
export function Field({ label, error, hint, style, testID, ...rest }: FieldProps) {
  const c = useColors();
  const [focused, setFocused] = useState(false);
  return (
    <View style={styles.wrap}>
      <Text variant="small" weight="semibold">
        {label}
      </Text>
      <TextInput
        accessibilityLabel={label}
        testID={testID}
        placeholderTextColor={c.textMuted}
        {...rest}
        // Read-only in the build-time snapshot: what is typed there would be lost when the app takes over.
        editable={isBuildSnapshot ? false : rest.editable}
        onFocus={(e) => {
          setFocused(true);
          rest.onFocus?.(e);
        }}
        onBlur={(e) => {
          setFocused(false);
          rest.onBlur?.(e);
        }}
        style={[
          styles.input,
          { color: c.text, backgroundColor: c.surface, borderColor: error ? c.danger : c.border, fontFamily: font.regular },
          focused && { borderColor: c.focus },
          style,
        ]}
      />
      <FieldNote error={error} hint={hint} testID={testID} />
    </View>
  );
}

/** Under an input: the API's field error (announced), else the hint. */
export function FieldNote({ error, hint, testID }: { error?: string | null; hint?: string; testID?: string }) {
  if (error)
    return (
      <Text variant="small" tone="danger" accessibilityLiveRegion="polite" testID={testID ? `${testID}-error` : undefined}>
        {error}
      </Text>
    );
  return hint ? (
    <Text variant="caption" tone="muted">
      {hint}
    </Text>
  ) : null;
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  input: { minHeight: touchTarget, borderWidth: 1, borderRadius: radius.md, paddingHorizontal: space.md, ...typeScale.body },
});
