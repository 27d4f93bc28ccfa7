import { RoleGate } from '@/components/shell/role-gate';
import { EmptyState, Screen } from '@/components/ui';

export default function SignOffsScreen() {
  return (
    <RoleGate name="sign-offs">
      <Screen title="Sign-offs" subtitle="Proposed setpoint changes waiting for review and electronic signature." testID="screen-sign-offs">
        <EmptyState
          title="Nothing waiting for you"
          message="When an engineer proposes a setpoint change, it appears here with the current and proposed plans side by side."
        />
      </Screen>
    </RoleGate>
  );
}
