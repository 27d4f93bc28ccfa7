import { StyleSheet, View } from 'react-native';
import type { OutboxMessage } from '../../contracts/mail';
import { useRetryMail } from '../../hooks/use-retry-mail';
import { radius, space, useColors } from '../../theme';
import { Button, Text } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

function statusLine(m: OutboxMessage, when: (iso: string) => string): { text: string; tone: 'success' | 'warning' | 'danger' } {
  if (m.status === 'sent') return { text: `Sent ${when(m.sentAt ?? m.createdAt)}`, tone: 'success' };
  if (m.status === 'failed') return { text: `Not delivered after ${m.attempts} attempts: ${m.lastError ?? 'unknown error'}`, tone: 'danger' };
  return {
    text: m.attempts
      ? `Pending: attempt ${m.attempts} failed (${m.lastError ?? 'unknown error'}); next try ${when(m.nextAttemptAt ?? m.createdAt)}`
      : 'Pending: queued for delivery',
    tone: 'warning',
  };
}

/** The site's outgoing mail with each message's delivery state; a message that gave up can be queued again. */
export function OutboxList({ messages }: { messages: OutboxMessage[] }) {
  const c = useColors();
  const retry = useRetryMail();
  const site = useSiteFormat();
  return (
    <View style={styles.list} testID="mail-outbox">
      {messages.map((m) => {
        const s = statusLine(m, site.time);
        return (
          <View key={m.id} style={[styles.row, { borderColor: c.border, backgroundColor: c.surface }]} testID="mail-outbox-row">
            <View style={styles.text}>
              <Text weight="semibold" variant="small">
                {m.subject}
              </Text>
              <Text variant="small" tone="muted">
                To {m.to} · queued {site.time(m.createdAt)}
              </Text>
              <Text variant="small" tone={s.tone} testID={`mail-status-${m.status}`}>
                {s.text}
              </Text>
            </View>
            {m.status === 'failed' ? (
              <Button
                label="Try again"
                variant="secondary"
                compact
                accessibilityLabel={`Send the mail to ${m.to} again`}
                onPress={() => void retry.submit(m.id)}
              />
            ) : null}
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  row: { borderWidth: 1, borderRadius: radius.md, padding: space.md, flexDirection: 'row', alignItems: 'center', gap: space.md },
  text: { flex: 1, gap: space.xxs },
});
