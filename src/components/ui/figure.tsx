import { StyleSheet } from 'react-native';
import { Card } from './card';
import { Text } from './text';

/** A key figure on its own card: the number large, what it counts beneath. Cards share a row and wrap. */
export function Figure({ label, value, testID }: { label: string; value: string | number; testID: string }) {
  return (
    <Card style={styles.figure}>
      <Text variant="figure" testID={testID}>
        {value}
      </Text>
      <Text tone="muted" variant="small">
        {label}
      </Text>
    </Card>
  );
}

const styles = StyleSheet.create({ figure: { flexGrow: 1, flexBasis: 140 } });
