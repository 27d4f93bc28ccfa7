import { StyleSheet, View } from 'react-native';
import type { ApiError } from '../../api/client';
import { useSiteFormat } from '../../hooks/use-site-format';
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

/**
 * The figures beside it are the device's last good answer, not the server's current one: `cachedAt` is that
 * answer's server time (an HTTP date), shown to the minute ("As of 14:02, offline").
 */
export function CachedNote({ cachedAt }: { cachedAt: string }) {
  const at = Date.parse(cachedAt);
  const site = useSiteFormat();
  return (
    <Text variant="small" tone="warning" weight="semibold" testID="cached-note" accessibilityLiveRegion="polite">
      {Number.isFinite(at) ? `As of ${site.time(new Date(at).toISOString())}, offline` : 'Offline: the last answer saved on this device'}: readings you log are
      kept here and sent when the network returns.
    </Text>
  );
}
