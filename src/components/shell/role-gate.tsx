import type { ReactNode } from 'react';
import { useSession } from '../../hooks/use-session';
import { isBuildSnapshot } from '../../web/snapshot';
import { EmptyState } from '../ui/states';
import { Screen } from '../ui/screen';
import { canSee, NAV_ITEMS } from './navigation';

/**
 * Renders a tab's screens only for the roles whose `place.<name>` row of the permission table holds them; each tab's
 * `_layout.tsx` wraps its `<Slot />` in one, and the API enforces the same table. The build-time snapshot knows no
 * role: it shows the screen's headings and placeholders, which are the same for everyone.
 */
export function RoleGate({ name, children }: { name: string; children: ReactNode }) {
  const { session } = useSession();
  if (!session) return isBuildSnapshot ? <>{children}</> : null;
  if (canSee(session.user.role, name)) return <>{children}</>;
  const label = NAV_ITEMS.find((i) => i.name === name)?.label ?? name;
  return (
    <Screen title={label} testID="screen-not-for-role">
      <EmptyState title="Not part of your role" message={`${label} is not available to your role. Ask your site admin if you need it.`} />
    </Screen>
  );
}
