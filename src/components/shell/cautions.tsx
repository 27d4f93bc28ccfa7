import { StyleSheet, View } from 'react-native';
import { space, useColors } from '../../theme';
import { Icon } from '../icons';
import { Text } from '../ui/text';

// Shown in the Cautions panel and the first-run notice. Plain statements of common practice.
export const CAUTIONS: { title: string; body: string }[] = [
  {
    title: 'Advice, not control',
    body: 'Yieldpoint recommends; qualified people decide. It never writes to a control system. Setpoint changes go through your site’s change control.',
  },
  {
    title: 'Plant data is read, never written',
    body: 'Where a vessel has a control-system source, Yieldpoint only reads its temperature tag over OPC UA (read, subscribe, browse, history); it sends no write or method call. A lost link raises a “signal lost” deviation: log readings by hand until it is back.',
  },
  {
    title: 'Hot vessels and jackets burn',
    body: 'Reactors, jackets, steam and hot-water lines at process temperature cause burns. Follow your site’s rules for work near hot equipment.',
  },
  {
    title: 'Above 100 °C is a pressure operation',
    body: 'Water-based batches above 100 °C are under pressure (about 1.2 bar absolute at 105 °C). Yieldpoint warns when a plan crosses 100 °C and never plans above a vessel’s maximum.',
  },
  {
    title: 'Enzyme dust and aerosols sensitise',
    body: 'Enzymes are respiratory sensitisers. Avoid dust and mist when dosing or cleaning; use the extraction and protective equipment your site specifies.',
  },
  {
    title: 'Local rules prevail',
    body: 'Local codes, site procedures and licensed practice take precedence over anything shown here.',
  },
];

export function CautionsList() {
  const c = useColors();
  return (
    <View style={styles.list} testID="cautions-list">
      {CAUTIONS.map((item) => (
        <View key={item.title} style={styles.item}>
          <Icon name="caution" color={c.accent} size={22} />
          <View style={styles.text}>
            <Text weight="semibold">{item.title}</Text>
            <Text tone="muted">{item.body}</Text>
          </View>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.lg },
  item: { flexDirection: 'row', gap: space.md, alignItems: 'flex-start' },
  text: { flex: 1, gap: space.xxs },
});
