import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The audit trail, opened from the Site and Sign-offs screens.
// Only the roles whose permission table row `place.audit` holds see them; the others get a plain refusal.
export default function AuditLayout() {
  return (
    <RoleGate name="audit">
      <Slot />
    </RoleGate>
  );
}
