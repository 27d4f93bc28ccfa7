import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { RoleGate } from '@/components/shell/role-gate';
import { Button, Card, DataTable, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import { ROLE_LABELS } from '@/contracts/roles';
import type { User } from '@/contracts/users';
import { useSite } from '@/hooks/use-site';
import { useUsers } from '@/hooks/use-users';
import { space, useBreakpoint } from '@/theme';

const USER_COLUMNS: Column<User>[] = [
  { key: 'name', label: 'Name', value: (u) => u.name, flex: 1.2 },
  { key: 'email', label: 'E-mail', value: (u) => u.email, flex: 1.6 },
  { key: 'role', label: 'Role', value: (u) => ROLE_LABELS[u.role] },
  { key: 'active', label: 'Status', value: (u) => (u.isActive ? 'Active' : 'Deactivated') },
];

function Figure({ label, value, testID }: { label: string; value: number; testID: string }) {
  return (
    <Card style={styles.figure}>
      <Text variant="figure" testID={testID}>
        {value}
      </Text>
      <Text tone="muted" variant="small">
        {label}
      </Text>
    </Card>
  );
}

function SiteBody() {
  const site = useSite();
  const users = useUsers();
  const { isWide } = useBreakpoint();
  if (site.error) return <ErrorState error={site.error} onRetry={site.retry} />;
  if (!site.data) return <Loader rows={2} label="Loading the site" />;
  const { counts } = site.data;
  return (
    <>
      <View style={[styles.figures, isWide && styles.figuresWide]}>
        <Figure label="active users" value={counts.activeUsers} testID="site-active-users" />
        <Figure label="vessels" value={counts.vessels} testID="site-vessels" />
        <Figure label="enzymes" value={counts.enzymes} testID="site-enzymes" />
        <Figure label="lots awaiting a decision" value={counts.quarantinedLots} testID="site-quarantined" />
      </View>
      <Text variant="title" accessibilityRole="header">
        People
      </Text>
      {users.error ? (
        <ErrorState error={users.error} onRetry={users.retry} />
      ) : !users.data ? (
        <Loader rows={5} label="Loading people" />
      ) : (
        <DataTable columns={USER_COLUMNS} rows={users.data.users} rowKey={(u) => String(u.id)} caption="People at this site" testID="users-table" />
      )}
    </>
  );
}

function SiteScreenContent() {
  const site = useSite();
  return (
    <Screen title="Site" subtitle={site.data ? `${site.data.name} · times in ${site.data.timeZone}` : 'People, roles and licence seats.'} testID="screen-site"
      actions={<Button label="Audit trail" variant="secondary" testID="open-audit" onPress={() => router.navigate('/audit')} />}
    >
      <SiteBody />
    </Screen>
  );
}

export default function SiteScreen() {
  return (
    <RoleGate name="site">
      <SiteScreenContent />
    </RoleGate>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  figuresWide: { flexWrap: 'nowrap' },
  figure: { flexGrow: 1, flexBasis: 140 },
});
