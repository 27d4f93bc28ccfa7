import { router } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { radius, space, touchTarget, useColors } from '../../theme';
import { Icon } from '../icons';
import { Text } from '../ui/text';

/** Phone header: the name and the way to the cautions, on every screen. */
export function TopBar({ siteName }: { siteName: string }) {
  const c = useColors();
  return (
    <View style={[styles.bar, { backgroundColor: c.navBackground }]} accessibilityRole="header" testID="topbar">
      <View style={styles.brand}>
        <Text variant="title" style={{ color: c.navActive }}>
          Yieldpoint
        </Text>
        <Text variant="caption" numberOfLines={1} style={{ color: c.navText, flexShrink: 1 }}>
          {siteName}
        </Text>
      </View>
      <Pressable role="link" accessibilityLabel="Cautions" testID="topbar-cautions" onPress={() => router.navigate('/cautions')} style={styles.button}>
        <Icon name="caution" color={c.navActive} size={22} />
        <Text variant="small" style={{ color: c.navText }}>
          Cautions
        </Text>
      </Pressable>
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', paddingHorizontal: space.lg, paddingVertical: space.xs },
  brand: { flexDirection: 'row', alignItems: 'baseline', gap: space.sm, flexShrink: 1 },
  button: { flexDirection: 'row', alignItems: 'center', gap: space.xs, minHeight: touchTarget, paddingHorizontal: space.sm, borderRadius: radius.md },
});
