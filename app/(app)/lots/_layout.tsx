import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The lots tab holds the list, a lot's detail and the enzyme library; the browser's history moves between them.
// Only the roles whose permission table row `place.lots` holds see them; the others get a plain refusal.
export default function LotsLayout() {
  return (
    <RoleGate name="lots">
      <Slot />
    </RoleGate>
  );
}
