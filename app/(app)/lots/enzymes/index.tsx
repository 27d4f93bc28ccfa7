import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Choice } from '@/components/ui/choice';
import { EnzymeForm } from '@/components/lots/enzyme-form';
import { Button, DataTable, EmptyState, ErrorState, Field, Loader, Screen, Text, type Column } from '@/components/ui';
import type { Enzyme, EnzymeSort } from '@/contracts/enzymes';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { useEnzymes } from '@/hooks/use-enzymes';
import { useSession } from '@/hooks/use-session';
import { space } from '@/theme';

const PAGE_SIZE = 10;

const COLUMNS: Column<Enzyme>[] = [
  { key: 'name', label: 'Product', value: (e) => e.name, flex: 1.2 },
  { key: 'class', label: 'Class (EC)', value: (e) => `${e.enzymeClass} (${e.ecNumber})`, flex: 1.6 },
  { key: 'supplier', label: 'Supplier', value: (e) => e.supplier, flex: 1.2 },
  { key: 'spec', label: 'Specification', value: (e) => `t½ ≥ ${fmt(e.specMinHalfLifeH, 0)} h at ${fmt(e.specTempC, 0)} °C`, flex: 1.4 },
  { key: 'activity', label: 'Min. activity', value: (e) => `${fmt(e.specMinActivity, 0)} ${e.activityUnit}`, isNumeric: true },
];

const SORTS = [
  { value: 'name', label: 'Name' },
  { value: 'enzymeClass', label: 'Class' },
  { value: 'supplier', label: 'Supplier' },
  { value: 'specMinHalfLifeH', label: 'Min. half-life' },
] as const satisfies readonly { value: EnzymeSort; label: string }[];

function EnzymesBody() {
  const { session } = useSession();
  const canEdit = !!session && can(session.user.role, 'lots.edit');
  const [q, setQ] = useState('');
  const [sort, setSort] = useState<(typeof SORTS)[number]['value']>('name');
  const [dir, setDir] = useState<'asc' | 'desc'>('asc');
  const [page, setPage] = useState(1);
  const [editing, setEditing] = useState<Enzyme | 'new' | null>(null);
  const { data, error, isLoading, retry } = useEnzymes({ q: q.trim() || undefined, sort, dir, page, pageSize: PAGE_SIZE });
  const pages = data ? Math.max(1, Math.ceil(data.total / PAGE_SIZE)) : 1;
  return (
    <>
      {canEdit && !editing ? (
        <View style={styles.row}>
          <Button label="New enzyme" onPress={() => setEditing('new')} testID="enzyme-add" />
        </View>
      ) : null}
      {editing ? (
        <EnzymeForm
          key={editing === 'new' ? 'new' : editing.id}
          enzyme={editing === 'new' ? undefined : editing}
          onDone={() => setEditing(null)}
          onCancel={() => setEditing(null)}
        />
      ) : null}
      <Field
        label="Search name, class, EC number or supplier"
        value={q}
        onChangeText={(t) => {
          setQ(t);
          setPage(1);
        }}
        testID="enzyme-search"
        accessibilityRole="search"
      />
      <View style={styles.row}>
        <Choice compact label="Sort by" value={sort} options={SORTS} onChange={setSort} testID="enzyme-sort" />
        <Choice
          compact
          label="Order"
          value={dir}
          options={[
            { value: 'asc', label: 'Ascending' },
            { value: 'desc', label: 'Descending' },
          ]}
          onChange={setDir}
        />
      </View>
      {error ? (
        <ErrorState error={error} onRetry={retry} />
      ) : isLoading || !data ? (
        <Loader rows={4} label="Loading enzymes" />
      ) : !data.enzymes.length ? (
        <EmptyState title="No enzymes match" message={q ? 'Try a shorter search.' : 'Add the first enzyme product.'} />
      ) : (
        <>
          <Text tone="muted" testID="enzymes-count">
            {data.total} enzyme{data.total === 1 ? '' : 's'} · page {page} of {pages}
          </Text>
          <DataTable
            columns={COLUMNS}
            rows={data.enzymes}
            rowKey={(e) => String(e.id)}
            caption="Enzyme library"
            testID="enzymes-table"
            onRowPress={(e) => router.push(`/lots/enzymes/${e.id}`)}
          />
          <View style={styles.row}>
            <Button label="Previous page" compact variant="secondary" disabled={page <= 1} onPress={() => setPage(page - 1)} />
            <Button label="Next page" compact variant="secondary" disabled={page >= pages} onPress={() => setPage(page + 1)} />
          </View>
        </>
      )}
    </>
  );
}

export default function EnzymesScreen() {
  return (
    <Screen
      title="Enzyme library"
      subtitle="Enzyme products, their activity units and the stability each lot must meet."
      testID="screen-enzymes"
      actions={<Button label="All lots" variant="ghost" compact onPress={() => router.replace('/lots')} />}
    >
      <EnzymesBody />
    </Screen>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg } });
