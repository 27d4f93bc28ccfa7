import { StyleSheet, View, type ViewProps } from 'react-native';
import { radius, space, useColors } from '../../theme';

export function Card({ style, ...rest }: ViewProps) {
  const c = useColors();
  return <View {...rest} style={[styles.card, { backgroundColor: c.surface, borderColor: c.border }, style]} />;
}

const styles = StyleSheet.create({ card: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm } });
