import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The billing tab: seats, payments and invoices.
// Only the roles whose permission table row `place.billing` holds see them; the others get a plain refusal.
export default function BillingLayout() {
  return (
    <RoleGate name="billing">
      <Slot />
    </RoleGate>
  );
}
