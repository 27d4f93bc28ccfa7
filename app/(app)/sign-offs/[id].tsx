import { ChangeRequestRecord } from '@/components/change-control/change-request-record';
import { ErrorState, Loader, Screen } from '@/components/ui';
import { useChangeRequest } from '@/hooks/use-change-requests';
import { useIdParam } from '@/hooks/use-id-param';
import { useSession } from '@/hooks/use-session';

function Body({ id }: { id: number | null }) {
  const { session } = useSession();
  const { data, error, isLoading, retry } = useChangeRequest(id);
  if (id === null) return <ErrorState error={new Error('No such change request')} />;
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data || !session) return <Loader rows={6} label="Loading the change request" />;
  return <ChangeRequestRecord detail={data} user={session.user} />;
}

export default function ChangeRequestScreen() {
  const id = useIdParam();
  return (
    <Screen title="Setpoint change" subtitle="Current against proposed, the reasons, and every signature." testID="screen-change-request">
      <Body id={id} />
    </Screen>
  );
}
