import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ChangeRequestList } from '@/components/change-control/change-request-list';
import { Button, Choice, EmptyState, ErrorState, Loader, Screen } from '@/components/ui';
import type { ChangeStatus } from '@/contracts/change-requests';
import { can } from '@/contracts/permissions';
import { useChangeRequests } from '@/hooks/use-change-requests';
import { useSession } from '@/hooks/use-session';
import { space } from '@/theme';

type Filter = ChangeStatus | 'all';
const FILTERS: { value: Filter; label: string }[] = [
  { value: 'proposed', label: 'Waiting' },
  { value: 'approved', label: 'Approved' },
  { value: 'rejected', label: 'Rejected' },
  { value: 'superseded', label: 'Superseded' },
  { value: 'all', label: 'All' },
];

function Body() {
  const [filter, setFilter] = useState<Filter>('proposed');
  const { data, error, isLoading, retry } = useChangeRequests(filter === 'all' ? undefined : filter);
  return (
    <>
      <Choice label="Show" value={filter} options={FILTERS} onChange={setFilter} testID="sign-offs-filter" />
      {error ? (
        <ErrorState error={error} onRetry={retry} />
      ) : isLoading || !data ? (
        <Loader rows={3} label="Loading change requests" />
      ) : !data.changeRequests.length ? (
        <EmptyState
          title={filter === 'proposed' ? 'Nothing waiting for sign-off' : 'No change requests here'}
          message="When an engineer proposes a saved plan as a setpoint change, it appears here with the current and proposed setpoints side by side."
        />
      ) : (
        <ChangeRequestList items={data.changeRequests} />
      )}
    </>
  );
}

export default function SignOffsScreen() {
  const { session } = useSession();
  const role = session?.user.role;
  const canAudit = !!role && can(role, 'audit-events.review');
  return (
    <Screen
      title="Sign-offs"
      subtitle="Proposed setpoint changes, their review and electronic signatures."
      testID="screen-sign-offs"
      actions={
        <View style={styles.actions}>
          {/* Only engineers save plans, so only they can propose one. */}
          {role === 'engineer' ? (
            <Button label="Propose from a plan" variant="secondary" testID="open-planner" onPress={() => router.navigate('/planner')} />
          ) : null}
          {canAudit ? <Button label="Audit trail" variant="secondary" testID="open-audit" onPress={() => router.navigate('/audit')} /> : null}
        </View>
      }
    >
      <Body />
    </Screen>
  );
}

const styles = StyleSheet.create({ actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
