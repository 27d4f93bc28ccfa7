import { router } from 'expo-router';
import { AssayEntry } from '@/components/lots/assay-entry';
import { AssayResults } from '@/components/lots/assay-results';
import { CertificateCard } from '@/components/lots/certificate-card';
import { DecisionCard } from '@/components/lots/decision-card';
import { Button, Card, Columns, EmptyState, ErrorState, Loader, Screen, Text } from '@/components/ui';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { useIdParam } from '@/hooks/use-id-param';
import { useLot } from '@/hooks/use-lots';
import { useSession } from '@/hooks/use-session';

const STATUS = { quarantined: 'Quarantined', accepted: 'Accepted', rejected: 'Rejected' } as const;

function LotBody({ id }: { id: number }) {
  const { session } = useSession();
  const { data, error, isLoading, retry } = useLot(id);
  const role = session?.user.role ?? 'operator';
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={6} label="Loading the lot" />;
  const { lot, enzyme } = data;
  const canEdit = can(role, 'lots.edit');
  return (
    <>
      <Card>
        <Text variant="title" testID="lot-title">
          {lot.lotCode} · {enzyme.name}
        </Text>
        <Text tone={lot.status === 'accepted' ? 'success' : lot.status === 'rejected' ? 'danger' : 'warning'} weight="semibold" testID="lot-status">
          {STATUS[lot.status]}
        </Text>
        <Text variant="small" tone="muted">
          {enzyme.enzymeClass} (EC {enzyme.ecNumber}) from {enzyme.supplier} · received {lot.receivedOn} · expires {lot.expiresOn} · {fmt(lot.quantityKg, 0)} kg
        </Text>
      </Card>
      {data.disagreement ? (
        <Card testID="lot-disagreement" accessibilityRole="alert">
          <Text weight="semibold" tone="warning">
            Assay fit and certificate disagree
          </Text>
          <Text>{data.disagreement}</Text>
          <Text variant="small" tone="muted">
            Plans use the assay fit; the supplier may want to hear about the certificate.
          </Text>
        </Card>
      ) : null}
      <Columns>
        <DecisionCard detail={data} canDecide={can(role, 'lots.decide')} />
        <CertificateCard lot={lot} conversion={data.conversion} certificate={data.certificate} canEdit={canEdit} />
      </Columns>
      {canEdit ? <AssayEntry lotId={lot.id} /> : null}
      {data.assays.length ? (
        data.assays.map((a) => <AssayResults key={a.id} assay={a} specTempC={enzyme.specTempC} />)
      ) : (
        <EmptyState title="No assay yet" message="Until QC data are uploaded, the certificate's figure is compared with the specification." />
      )}
    </>
  );
}

export default function LotScreen() {
  const lotId = useIdParam();
  return (
    <Screen
      title="Lot"
      subtitle="Certificate, QC assays and the decision on this lot."
      testID="screen-lot"
      actions={<Button label="All lots" variant="ghost" compact onPress={() => (router.canGoBack() ? router.back() : router.replace('/lots'))} />}
    >
      {lotId ? <LotBody id={lotId} /> : <EmptyState title="No such lot" message="The address does not name a lot." />}
    </Screen>
  );
}
