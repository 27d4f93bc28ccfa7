import { ScrollView, StyleSheet, View } from 'react-native';
import { maxContentWidth, space, useBreakpoint, useColors } from '../../theme';
import { Text } from './text';

type Props = { title: string; subtitle?: string; testID: string; actions?: React.ReactNode; children: React.ReactNode };

/** A screen's scrolling column: one column on a phone, centred and width-capped on a wide screen. */
export function Screen({ title, subtitle, testID, actions, children }: Props) {
  const c = useColors();
  const { isWide } = useBreakpoint();
  return (
    <ScrollView testID={testID} style={{ backgroundColor: c.background }} contentContainerStyle={[styles.content, isWide && styles.wide]}>
      <View style={styles.header}>
        <View style={styles.titles}>
          <Text variant="headline" accessibilityRole="header">
            {title}
          </Text>
          {subtitle ? <Text tone="muted">{subtitle}</Text> : null}
        </View>
        {actions}
      </View>
      {children}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  content: { padding: space.lg, gap: space.lg, width: '100%', maxWidth: maxContentWidth, alignSelf: 'center' },
  wide: { padding: space.xxl },
  header: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: space.md },
  titles: { gap: space.xs, flexShrink: 1 },
});
