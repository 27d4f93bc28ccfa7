import { router } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';
import { Button, EmptyState, Screen } from '@/components/ui';
import { useSession } from '@/hooks/use-session';

export default function SignOffsScreen() {
  const { session } = useSession();
  const canAudit = session?.user.role === 'supervisor' || session?.user.role === 'admin';
  return (
    <RoleGate name="sign-offs">
      <Screen title="Sign-offs" subtitle="Proposed setpoint changes waiting for review and electronic signature." testID="screen-sign-offs"
        actions={canAudit ? <Button label="Audit trail" variant="secondary" testID="open-audit" onPress={() => router.navigate('/audit')} /> : undefined}
      >
        <EmptyState
          title="Nothing waiting for you"
          message="When an engineer proposes a setpoint change, it appears here with the current and proposed plans side by side."
        />
      </Screen>
    </RoleGate>
  );
}
