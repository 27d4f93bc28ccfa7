import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { api, ApiError } from '@/api/client';
import type { Reading, ReadingsPage } from '@/contracts/batches';
import { fmt } from '@/format';
import { useSiteFormat } from '@/hooks/use-site-format';
import { space } from '@/theme';
import { Button, DataTable, Text, type Column } from '../ui';

/** A row of a readings table: stored on the server, still on this device, or refused by the server. */
export type ReadingRow = { key: string; takenAt: string; h: number; c: number; by: string; note: string };

/** The readings table's columns, times shown by `time` (the site's clock, zone named). */
export const readingColumns = (time: (iso: string) => string): Column<ReadingRow>[] => [
  { key: 'time', label: 'Time', value: (r) => time(r.takenAt) },
  { key: 'h', label: 'Hour', value: (r) => fmt(r.h, 2), isNumeric: true },
  { key: 'c', label: '°C', value: (r) => fmt(r.c), isNumeric: true },
  { key: 'by', label: 'By', value: (r) => r.by, flex: 1.2 },
  { key: 'note', label: 'Note', value: (r) => r.note, flex: 1.5 },
];

const SOURCE_BY = { historian: 'historian', control_system: 'control system' } as const;

export const readingRow = (r: Reading): ReadingRow => ({
  key: r.key,
  takenAt: r.takenAt,
  h: r.h,
  c: r.c,
  by: r.source === 'manual' ? r.enteredBy : SOURCE_BY[r.source],
  note: r.note ?? '',
});

const PAGE = 50;

/**
 * Every stored reading of the batch, newest first, fetched a page at a time on request: a long historian record
 * stays readable on a phone without sending it whole.
 */
export function ReadingPages({ batchId, total }: { batchId: number; total: number }) {
  const [rows, setRows] = useState<ReadingRow[]>([]);
  const [next, setNext] = useState<number | null | undefined>(undefined);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const site = useSiteFormat();
  const load = async () => {
    setBusy(true);
    setError(null);
    try {
      const page = await api<ReadingsPage>(`/batches/${batchId}/readings?limit=${PAGE}${next ? `&before=${next}` : ''}`);
      setRows((old) => [...old, ...page.readings.map(readingRow)]);
      setNext(page.nextBefore);
    } catch (e) {
      setError(e instanceof ApiError ? e.message : String(e));
    } finally {
      setBusy(false);
    }
  };
  const isOpen = next !== undefined;
  return (
    <View style={styles.block} testID="reading-pages">
      {isOpen ? (
        <DataTable
          columns={readingColumns(site.time)}
          rows={rows}
          rowKey={(r) => r.key}
          caption="All stored readings, newest first"
          testID="reading-pages-table"
        />
      ) : null}
      {isOpen ? (
        <Text variant="small" tone="muted" testID="reading-pages-count">
          {rows.length.toLocaleString('en')} of {total.toLocaleString('en')} stored readings shown, newest first.
        </Text>
      ) : null}
      {error ? (
        <Text variant="small" tone="danger">
          {error}
        </Text>
      ) : null}
      {next !== null ? (
        <Button
          label={isOpen ? `Older ${PAGE}` : `All ${total.toLocaleString('en')} stored readings`}
          variant="ghost"
          onPress={() => void load()}
          isBusy={busy}
          testID="reading-pages-more"
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({ block: { gap: space.sm } });
