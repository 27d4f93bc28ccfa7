import { useState } from 'react';
import { Modal, ScrollView, StyleSheet, View } from 'react-native';
import { useAcknowledgeCautions } from '../../hooks/use-acknowledge-cautions';
import { maxContentWidth, radius, space, useColors } from '../../theme';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { CautionsList } from './cautions';

/** Shown once per user, until they confirm they have read the cautions; the server remembers. */
export function FirstRunNotice() {
  const c = useColors();
  const acknowledge = useAcknowledgeCautions();
  const [isBusy, setBusy] = useState(false);
  const [failed, setFailed] = useState<string | null>(null);
  return (
    <Modal transparent animationType="fade" visible>
      <View style={[styles.backdrop, { backgroundColor: 'rgba(10,16,19,0.6)' }]}>
        <View accessibilityRole="alert" aria-modal testID="first-run-notice" style={[styles.sheet, { backgroundColor: c.surface, borderColor: c.border }]}>
          <ScrollView contentContainerStyle={styles.content}>
            <Text variant="title" accessibilityRole="header">
              Before you start
            </Text>
            <Text tone="muted">Yieldpoint supports decisions about hot, pressurised and sensitising work. Please read these once.</Text>
            <CautionsList />
            {failed ? <Text tone="danger">{failed}</Text> : null}
            <Button
              label="I have read the cautions"
              testID="acknowledge-cautions"
              isBusy={isBusy}
              onPress={async () => {
                setBusy(true);
                setFailed(null);
                try {
                  await acknowledge();
                } catch (e) {
                  setFailed(e instanceof Error ? e.message : String(e));
                  setBusy(false);
                }
              }}
            />
          </ScrollView>
        </View>
      </View>
    </Modal>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, justifyContent: 'center', alignItems: 'center', padding: space.lg },
  sheet: { width: '100%', maxWidth: maxContentWidth / 2, maxHeight: '100%', borderRadius: radius.lg, borderWidth: 1 },
  content: { padding: space.xl, gap: space.lg },
});
