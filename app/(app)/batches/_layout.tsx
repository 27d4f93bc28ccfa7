import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The batches tab holds the list, a batch, the start form and the printable report; browser history moves between them.
// Only the roles whose permission table row `place.batches` holds see them; the others get a plain refusal.
export default function BatchesLayout() {
  return (
    <RoleGate name="batches">
      <Slot />
    </RoleGate>
  );
}
