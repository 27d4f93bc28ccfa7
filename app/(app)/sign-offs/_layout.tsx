import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The sign-offs tab holds the list of change requests, one request's record, and a new proposal.
// Only the roles whose permission table row `place.sign-offs` holds see them; the others get a plain refusal.
export default function SignOffsLayout() {
  return (
    <RoleGate name="sign-offs">
      <Slot />
    </RoleGate>
  );
}
