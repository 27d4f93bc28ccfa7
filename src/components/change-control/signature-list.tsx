import { StyleSheet, View } from 'react-native';
import type { Signature } from '../../contracts/change-requests';
import { space } from '../../theme';
import { Card, Text } from '../ui';
import { MEANING_LABELS, utcTime } from './labels';

/** Each signature as it must read wherever the record is shown: printed name, meaning, UTC and site time. */
export function SignatureList({ items }: { items: Signature[] }) {
  if (!items.length) return <Text tone="muted">No signatures yet.</Text>;
  return (
    <View style={styles.list} testID="signature-list">
      {items.map((s) => (
        <Card key={s.id} testID={`signature-${s.id}`} accessibilityLabel={`${MEANING_LABELS[s.meaning]} by ${s.printedName}`}>
          <Text weight="semibold">
            {MEANING_LABELS[s.meaning]} · {s.printedName} ({s.role})
          </Text>
          <Text variant="small">{utcTime(s.signedAtUtc)}</Text>
          <Text variant="small">Site time: {s.signedAtSite}</Text>
          {s.comment ? <Text variant="small">“{s.comment}”</Text> : null}
          <Text variant="caption" tone="muted" selectable>
            Signed record hash {s.recordHash}
          </Text>
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({ list: { gap: space.sm } });
