import { router } from 'expo-router';
import { PlanSheet } from '@/components/planner/plan-sheet';
import { Button, ErrorState, Loader, Screen } from '@/components/ui';
import { useIdParam } from '@/hooks/use-id-param';
import { usePlan } from '@/hooks/use-plans';

function Body({ id }: { id: number | null }) {
  const { data, error, isLoading, retry } = usePlan(id);
  if (id === null) return <ErrorState error={new Error('No such plan')} />;
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={4} label="Loading the plan" />;
  return <PlanSheet plan={data} />;
}

export default function PlanScreen() {
  const id = useIdParam('planId');
  return (
    <Screen
      title="Saved plan"
      subtitle="Immutable once saved; change control signs exactly this content."
      testID="screen-plan"
      actions={
        id !== null ? <Button label="Propose as setpoint change" testID="plan-propose" onPress={() => router.push(`/sign-offs/new?planId=${id}`)} /> : undefined
      }
    >
      <Body id={id} />
    </Screen>
  );
}
