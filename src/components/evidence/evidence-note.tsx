import { StyleSheet, View } from 'react-native';
import type { KineticsEvidence } from '../../contracts/plans';
import { space } from '../../theme';
import { Text } from '../ui';

const SOURCE_LABELS: Record<KineticsEvidence['source'], string> = {
  certificate: 'Kinetics from the certificate',
  fit: 'Kinetics from the lot’s assay fit',
  calibration: 'Kinetics from an accepted calibration',
};

type Props = {
  /** Absent on records stored before evidence was kept. */
  evidence: KineticsEvidence | undefined | null;
  /** A stored plan's "computed on older evidence" sentence, when the lot has newer evidence now. */
  olderEvidence?: string | null;
  /** The fit-vs-certificate disagreement is for the engineer and procurement; records for others leave it out. */
  showDisagreement?: boolean;
  testID: string;
};

/** Where a computation's kinetics came from, in words, with the marks that ask for a second look. */
export function EvidenceNote({ evidence, olderEvidence, showDisagreement = false, testID }: Props) {
  return (
    <View style={styles.wrap} testID={testID}>
      <Text variant="small" testID={`${testID}-text`}>
        <Text variant="small" weight="semibold">
          {evidence ? SOURCE_LABELS[evidence.source] : 'Kinetics'}:{' '}
        </Text>
        {evidence ? evidence.text : 'not recorded (stored before Yieldpoint kept where kinetics came from)'}
      </Text>
      {olderEvidence ? (
        <Text variant="small" tone="warning" weight="semibold" testID={`${testID}-older`}>
          {olderEvidence}
        </Text>
      ) : null}
      {showDisagreement && evidence?.disagreement ? (
        <Text variant="small" tone="warning" testID={`${testID}-disagreement`}>
          {evidence.disagreement}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: space.xs } });
