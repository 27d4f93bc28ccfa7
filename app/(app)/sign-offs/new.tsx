import { ProposeForm } from '@/components/change-control/propose-form';
import { EmptyState, ErrorState, Loader, Screen } from '@/components/ui';
import { can } from '@/contracts/permissions';
import { useIdParam } from '@/hooks/use-id-param';
import { usePlan } from '@/hooks/use-plans';
import { useSession } from '@/hooks/use-session';

function Body({ planId }: { planId: number | null }) {
  const { session } = useSession();
  const { data, error, isLoading, retry } = usePlan(planId);
  if (planId === null) return <EmptyState title="Choose a plan first" message="Open a saved plan in the planner and propose it from there." />;
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data || !session) return <Loader rows={4} label="Loading the plan" />;
  if (!can(session.user.role, 'change-requests.propose'))
    return <EmptyState title="Not part of your role" message="Engineers and supervisors propose setpoint changes." />;
  return <ProposeForm plan={data} timeZone={session.user.siteTimeZone} />;
}

export default function ProposeChangeScreen() {
  const planId = useIdParam('planId');
  return (
    <Screen
      title="Propose a setpoint change"
      subtitle="The saved plan goes to the site’s supervisors for review and electronic signature."
      testID="screen-propose-change"
    >
      <Body planId={planId} />
    </Screen>
  );
}
