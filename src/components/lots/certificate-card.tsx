import { Linking, StyleSheet, View } from 'react-native';
import type { CertConversion, CertificateFile, Lot } from '../../contracts/lots';
import { useUploadCertificate } from '../../hooks/use-upload-certificate';
import { fmt } from '../../format';
import { space } from '../../theme';
import { Button, Card, Text } from '../ui';
import { pickFile } from './pick-file';

const kb = (bytes: number) => `${fmt(bytes / 1024, 0)} KB`;

/** The certificate's figures, the engine's conversion of its stability figure, and the attached file. */
export function CertificateCard({
  lot,
  conversion,
  certificate,
  canEdit,
}: {
  lot: Lot;
  conversion: CertConversion;
  certificate: CertificateFile | null;
  canEdit: boolean;
}) {
  const { submit, error, isBusy } = useUploadCertificate(lot.id);
  return (
    <Card testID="certificate-card">
      <Text variant="title">Certificate of analysis</Text>
      <Text>
        Activity {fmt(lot.certActivity, 0)} {lot.activityUnit} · stability figure converted to kd = {fmt(conversion.kdPerH, 4)} /h at {fmt(conversion.tempC, 0)}{' '}
        °C (half-life {fmt(conversion.halfLifeH, 2)} h)
      </Text>
      <View testID="certificate-conversion">
        {conversion.steps.map((s) => (
          <Text key={s} variant="small" tone="muted">
            {s}
          </Text>
        ))}
      </View>
      {certificate ? (
        <View style={styles.file}>
          <Text variant="small" testID="certificate-file">
            {certificate.fileName} · {kb(certificate.sizeBytes)} · uploaded {certificate.uploadedAt.slice(0, 10)} by {certificate.uploadedBy}
          </Text>
          <Text variant="caption" tone="muted" selectable>
            SHA-256 {certificate.sha256}
          </Text>
          <View style={styles.start}>
            <Button label="Download certificate" variant="secondary" compact onPress={() => Linking.openURL(`/api/lots/${lot.id}/certificate`)} />
          </View>
        </View>
      ) : (
        <Text tone="muted" variant="small">
          No certificate file attached yet.
        </Text>
      )}
      {error ? (
        <Text tone="danger" accessibilityLiveRegion="polite" testID="certificate-error">
          {error.message}
        </Text>
      ) : null}
      {canEdit ? (
        <Button
          label={certificate ? 'Replace certificate (PDF, PNG or JPEG, up to 10 MB)' : 'Attach certificate (PDF, PNG or JPEG, up to 10 MB)'}
          variant="secondary"
          isBusy={isBusy}
          testID="certificate-upload"
          onPress={async () => {
            const picked = await pickFile(['application/pdf', 'image/png', 'image/jpeg']);
            if (picked) await submit(picked.file, picked.name);
          }}
        />
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ file: { gap: space.xs }, start: { alignSelf: 'flex-start' } });
