import { StyleSheet, View } from 'react-native';
import type { AuditEvent } from '../../contracts/audit-events';
import { useSiteFormat } from '../../hooks/use-site-format';
import { radius, space, useColors } from '../../theme';
import { DataTable, Text, type Column } from '../ui';
import { auditChanges, auditSentence, type AuditChange } from './audit-sentence';

const COLUMNS: Column<AuditChange>[] = [
  { key: 'field', label: 'Field', value: (r) => r.field, flex: 1 },
  { key: 'before', label: 'Before', value: (r) => r.before, flex: 1.5 },
  { key: 'after', label: 'After', value: (r) => r.after, flex: 1.5 },
];
// A record that had no value before (a creation, a sign-in) is a list of what was recorded.
const RECORDED: Column<AuditChange>[] = [COLUMNS[0]!, { key: 'after', label: 'Recorded', value: (r) => r.after, flex: 3 }];

/** One audit event: a sentence, when on the site's clock, and what it changed as a small before/after table. */
export function AuditEventItem({ e }: { e: AuditEvent }) {
  const c = useColors();
  const site = useSiteFormat();
  const changes = auditChanges(e, site);
  return (
    <View style={[styles.item, { borderColor: c.border, backgroundColor: c.surface }]} testID="audit-event">
      <Text weight="semibold" style={styles.wrap}>
        {auditSentence(e)}
      </Text>
      <Text variant="small" tone="muted">
        {site.stamp(e.at)}
      </Text>
      {changes.length ? (
        <DataTable
          columns={changes.every((r) => r.before === '–') ? RECORDED : COLUMNS}
          rows={changes}
          rowKey={(r) => r.field}
          caption="What changed"
          testID="audit-changes"
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  item: { borderWidth: 1, borderRadius: radius.lg, padding: space.md, gap: space.xs },
  // An e-mail address or a record has no space to break at on a phone.
  wrap: { wordBreak: 'break-word' } as object,
});
