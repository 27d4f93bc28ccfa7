import { RoleGate } from '@/components/shell/role-gate';
import { EmptyState, Screen } from '@/components/ui';

export default function BatchesScreen() {
  return (
    <RoleGate name="batches">
      <Screen title="Batches" subtitle="Running batches: log the reactor temperature and follow the forecast." testID="screen-batches">
        <EmptyState
          title="No batches running"
          message="A batch appears here when a supervisor or engineer starts it on a vessel with an accepted lot."
        />
      </Screen>
    </RoleGate>
  );
}
