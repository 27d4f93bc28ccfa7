import { RoleGate } from '@/components/shell/role-gate';
import { DataTable, EmptyState, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import type { Vessel } from '@/contracts/vessels';
import { fmt } from '@/format';
import { useVessels } from '@/hooks/use-vessels';

const VESSEL_COLUMNS: Column<Vessel>[] = [
  { key: 'name', label: 'Vessel', value: (v) => v.name, flex: 1.4 },
  { key: 'volume', label: 'Working volume', value: (v) => `${fmt(v.workingVolumeL / 1000, 1)} m³`, isNumeric: true },
  { key: 'range', label: 'Allowed range', value: (v) => `${fmt(v.minC, 0)}–${fmt(v.maxC, 0)} °C`, isNumeric: true },
  { key: 'rates', label: 'Heat / cool', value: (v) => `${fmt(v.maxHeatCPerH, 0)} / ${fmt(v.maxCoolCPerH, 0)} °C/h`, isNumeric: true },
  { key: 'hygienic', label: 'Hygienic minimum', value: (v) => `${fmt(v.hygienicMinC, 0)} °C`, isNumeric: true },
];

function PlannerBody() {
  const { data, error, isLoading, retry } = useVessels();
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={3} label="Loading vessels" />;
  if (!data.vessels.length) return <EmptyState title="No vessels yet" message="Add the site's vessels to plan batches in them." />;
  return (
    <>
      <Text tone="muted">
        Recommendations are planned inside each vessel’s limits. Recipes and the setpoint recommendation for them are being built; the vessels
        below are what they will be planned in.
      </Text>
      <DataTable columns={VESSEL_COLUMNS} rows={data.vessels} rowKey={(v) => String(v.id)} caption="Vessels and their limits" testID="vessels-table" />
    </>
  );
}

export default function PlannerScreen() {
  return (
    <RoleGate name="planner">
      <Screen title="Planner" subtitle="The setpoint that makes the most product over the whole batch." testID="screen-planner">
        <PlannerBody />
      </Screen>
    </RoleGate>
  );
}
