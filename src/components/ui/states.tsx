import { StyleSheet, View } from 'react-native';
import type { ApiError } from '../../api/client';
import { radius, space, useColors } from '../../theme';
import { Button } from './button';
import { Card } from './card';
import { Text } from './text';

/** Placeholder blocks the size of the content, so nothing jumps when data arrives. */
export function Loader({ rows = 3, label = 'Loading' }: { rows?: number; label?: string }) {
  const c = useColors();
  return (
    <View accessibilityRole="progressbar" accessibilityLabel={label} testID="loader" style={styles.loader}>
      {Array.from({ length: rows }, (_, i) => (
        <View key={i} style={[styles.skeleton, { backgroundColor: c.border, opacity: 0.5 }]} />
      ))}
    </View>
  );
}

export function ErrorState({ error, onRetry }: { error: ApiError | Error; onRetry?: () => void }) {
  return (
    <Card testID="error-state" accessibilityRole="alert">
      <Text weight="semibold" tone="danger">
        Could not load this
      </Text>
      <Text tone="muted">{error.message}</Text>
      {onRetry ? <Button label="Try again" variant="secondary" onPress={onRetry} /> : null}
    </Card>
  );
}

export function EmptyState({ title, message, action }: { title: string; message: string; action?: React.ReactNode }) {
  return (
    <Card testID="empty-state">
      <Text weight="semibold">{title}</Text>
      <Text tone="muted">{message}</Text>
      {action}
    </Card>
  );
}

const styles = StyleSheet.create({
  loader: { gap: space.sm },
  skeleton: { height: 56, borderRadius: radius.md },
});
