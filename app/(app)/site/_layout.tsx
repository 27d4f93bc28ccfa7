import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The site tab: people, invites, outgoing mail, the control-system link and the site's settings.
// Only the roles whose permission table row `place.site` holds see them; the others get a plain refusal.
export default function SiteLayout() {
  return (
    <RoleGate name="site">
      <Slot />
    </RoleGate>
  );
}
