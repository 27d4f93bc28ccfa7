import { useState } from 'react';
import { Linking, StyleSheet, View } from 'react-native';
import { AuditEventItem } from '@/components/audit/audit-event-item';
import { Button, Card, EmptyState, ErrorState, Loader, Screen, Text } from '@/components/ui';
import { useAuditEvents } from '@/hooks/use-audit-events';
import { useVerifyAudit } from '@/hooks/use-verify-audit';
import { space } from '@/theme';

const ACTIONS = [
  { value: undefined, label: 'Everything' },
  { value: 'sign-in', label: 'Sign-ins' },
  { value: 'sign-in.failed', label: 'Failed sign-ins' },
  { value: 'user.update', label: 'User changes' },
  { value: 'change-request.create', label: 'Proposals' },
  { value: 'signature.create', label: 'Signatures' },
  { value: 'signature.refused', label: 'Refused signatures' },
  { value: 'change-request.approve', label: 'Approvals' },
  { value: 'change-request.reject', label: 'Rejections' },
  { value: 'recipe.release', label: 'Releases' },
] as const;

function VerifyCard() {
  const { submit: verify, result, error, isBusy } = useVerifyAudit();
  return (
    <Card>
      <Text weight="semibold">Chain check</Text>
      <Text tone="muted" variant="small">
        Each event carries a keyed hash of the one before it, so an edited or deleted event breaks every later link; signed checkpoints kept outside the
        database catch removed newest events, and lot decisions, signatures and change requests are compared with their audited state.
      </Text>
      {result ? (
        <Text tone={result.ok ? 'success' : 'danger'} testID="audit-verify-result" accessibilityLiveRegion="polite">
          {result.ok
            ? `Unbroken: all ${result.events} events check out.`
            : `${result.problems.length} problem${result.problems.length > 1 ? 's' : ''}: ${result.problems
                .slice(0, 3)
                .map((p) => p.message)
                .join('; ')}.`}
        </Text>
      ) : null}
      {result?.ok ? (
        <Text tone="muted" variant="small" testID="audit-verify-detail">
          {result.checkpoints
            ? `Matches all ${result.checkpoints} signed checkpoints (the last at ${result.lastCheckpointAt}).`
            : 'No signed checkpoint yet; one is written every 15 minutes.'}{' '}
          Every decided lot, signature and change request reads as audited.
        </Text>
      ) : null}
      {error ? <Text tone="danger">{error.message}</Text> : null}
      <Button label="Check the chain now" variant="secondary" onPress={verify} isBusy={isBusy} testID="audit-verify" />
    </Card>
  );
}

function AuditBody() {
  const [action, setAction] = useState<string | undefined>(undefined);
  const [offset, setOffset] = useState(0);
  const { data, error, isLoading, retry } = useAuditEvents({ action, offset });
  return (
    <>
      <VerifyCard />
      <View style={styles.filters} accessibilityLabel="Filter by action">
        {ACTIONS.map((a) => (
          <Button
            key={a.label}
            label={a.label}
            compact
            variant={a.value === action ? 'primary' : 'secondary'}
            accessibilityState={{ selected: a.value === action }}
            onPress={() => {
              setAction(a.value);
              setOffset(0);
            }}
          />
        ))}
        <Button
          label="Export CSV"
          compact
          variant="ghost"
          onPress={() => Linking.openURL(`/api/audit-events/export.csv${action ? `?action=${action}` : ''}`)}
        />
      </View>
      {error ? (
        <ErrorState error={error} onRetry={retry} />
      ) : isLoading || !data ? (
        <Loader rows={6} label="Loading the audit trail" />
      ) : !data.events.length ? (
        <EmptyState title="No events" message="Nothing matches this filter yet." />
      ) : (
        <>
          <Text tone="muted" testID="audit-count">
            {offset + 1}–{offset + data.events.length} of {data.total} events, newest first
          </Text>
          <View style={styles.events} testID="audit-table" accessibilityLabel="Audit trail">
            {data.events.map((e) => (
              <AuditEventItem key={e.id} e={e} />
            ))}
          </View>
          <View style={styles.filters}>
            <Button label="Newer" compact variant="secondary" disabled={offset === 0} onPress={() => setOffset(Math.max(0, offset - 50))} />
            <Button label="Older" compact variant="secondary" disabled={offset + 50 >= data.total} onPress={() => setOffset(offset + 50)} />
          </View>
        </>
      )}
    </>
  );
}

export default function AuditScreen() {
  return (
    <Screen
      title="Audit trail"
      subtitle="Every sign-in, change, signature and decision at this site, on the site clock. Append-only; the CSV keeps each raw record."
      testID="screen-audit"
    >
      <AuditBody />
    </Screen>
  );
}

const styles = StyleSheet.create({ filters: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm }, events: { gap: space.sm } });
