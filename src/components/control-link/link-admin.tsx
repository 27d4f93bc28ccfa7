import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { CertificateInfo, LinkStatus, SOURCE_UNITS, VesselSource } from '../../contracts/control-link';
import { fmt } from '../../format';
import { useLinkStatus, useSaveSource, useServerCertificate, useTrustServer, useVesselSources } from '../../hooks/use-control-link';
import { useVessels } from '../../hooks/use-vessels';
import { space } from '../../theme';
import { ageText } from '../batches/link-line';
import { Button, Card, Choice, DataTable, ErrorState, Field, Loader, Text, type Column } from '../ui';

const STATUS_COLUMNS: Column<LinkStatus>[] = [
  { key: 'vessel', label: 'Vessel', value: (l) => l.vesselName, flex: 1.3 },
  { key: 'state', label: 'Link', value: (l) => l.state },
  { key: 'value', label: 'Last °C', value: (l) => (l.lastValueC === null ? '—' : fmt(l.lastValueC)), isNumeric: true },
  { key: 'age', label: 'Age', value: (l) => ageText(l.ageS) },
  { key: 'errors', label: 'Errors', value: (l) => String(l.errors), isNumeric: true },
  { key: 'error', label: 'Last error', value: (l) => l.lastError ?? '', flex: 2 },
];

type Unit = (typeof SOURCE_UNITS)[number];
type Security = 'secure' | 'none';
type Login = 'password' | 'certificate';

/** Sets one vessel's source: where its temperature tag is, in which unit, and how to log in. */
function SourceForm({ sources }: { sources: VesselSource[] }) {
  const vessels = useVessels();
  const save = useSaveSource();
  const [vesselId, setVesselId] = useState<number | null>(null);
  const current = sources.find((s) => s.vesselId === vesselId);
  const [form, setForm] = useState({ endpointUrl: '', nodeId: '', userName: '', password: '' });
  const [unit, setUnit] = useState<Unit>('degC');
  const [security, setSecurity] = useState<Security>('secure');
  const [confirmNone, setConfirmNone] = useState(false);
  const [login, setLogin] = useState<Login>('password');
  if (!vessels.data) return <Loader rows={2} label="Loading vessels" />;
  const pick = (id: number) => {
    const s = sources.find((x) => x.vesselId === id);
    setVesselId(id);
    setForm({ endpointUrl: s?.endpointUrl ?? '', nodeId: s?.nodeId ?? '', userName: s?.userName ?? '', password: '' });
    setUnit(s?.unit ?? 'degC');
    setSecurity(s?.securityPolicy === 'None' ? 'none' : 'secure');
    setLogin(s?.userCertificate ? 'certificate' : 'password');
    save.clearError();
  };
  const fields = save.error?.fields ?? {};
  const submit = () =>
    vesselId &&
    save.submit(vesselId, {
      ...form,
      ...(login === 'certificate' ? { userName: '', password: undefined, userCertificate: true } : { password: form.password || undefined }),
      unit,
      ...(security === 'none'
        ? { securityPolicy: 'None', securityMode: 'None', allowInsecure: confirmNone }
        : { securityPolicy: 'Basic256Sha256', securityMode: 'SignAndEncrypt' }),
    });
  return (
    <View style={styles.stack}>
      <Choice
        label="Vessel"
        value={vesselId ?? 0}
        options={vessels.data.vessels.map((v) => ({ value: v.id, label: v.name }))}
        onChange={pick}
        compact
        testID="source-vessel"
      />
      {vesselId ? (
        <>
          <Field
            label="Server address"
            value={form.endpointUrl}
            onChangeText={(t) => setForm({ ...form, endpointUrl: t })}
            placeholder="opc.tcp://historian.plant:4840"
            error={fields.endpointUrl}
            testID="source-endpoint"
            autoCapitalize="none"
          />
          <Field
            label="Node id of the temperature"
            value={form.nodeId}
            onChangeText={(t) => setForm({ ...form, nodeId: t })}
            placeholder="ns=2;s=R101.TT01"
            error={fields.nodeId}
            testID="source-node"
            autoCapitalize="none"
          />
          <Choice
            label="Unit of the tag"
            value={unit}
            options={[
              { value: 'degC', label: '°C' },
              { value: 'K', label: 'K' },
              { value: 'degF', label: '°F' },
            ]}
            onChange={setUnit}
            compact
            testID="source-unit"
          />
          <Choice
            label="Log in with"
            value={login}
            options={[
              { value: 'password', label: 'User name and password' },
              { value: 'certificate', label: 'Yieldpoint’s user certificate' },
            ]}
            onChange={setLogin}
            compact
            testID="source-login"
          />
          {login === 'password' ? (
            <>
              <Field
                label="User name"
                value={form.userName}
                onChangeText={(t) => setForm({ ...form, userName: t })}
                error={fields.userName}
                testID="source-user"
                autoCapitalize="none"
              />
              <Field
                label="Password"
                value={form.password}
                onChangeText={(t) => setForm({ ...form, password: t })}
                secureTextEntry
                hint={current?.hasPassword ? 'Stored; leave empty to keep it' : undefined}
                error={fields.password}
                testID="source-password"
              />
            </>
          ) : (
            <Text variant="small" tone="muted">
              The server’s admin trusts Yieldpoint’s user certificate (its thumbprint is above) as a user allowed to read.
            </Text>
          )}
          <Choice
            label="Security"
            value={security}
            options={[
              { value: 'secure', label: 'Basic256Sha256, sign and encrypt' },
              { value: 'none', label: 'None' },
            ]}
            onChange={setSecurity}
            compact
            testID="source-security"
          />
          {security === 'none' ? (
            <Choice
              label="Security None sends temperatures and the password unencrypted and unsigned. Choose it anyway?"
              value={confirmNone ? 'yes' : 'no'}
              options={[
                { value: 'no', label: 'No' },
                { value: 'yes', label: 'Yes, recorded in the audit trail' },
              ]}
              onChange={(v) => setConfirmNone(v === 'yes')}
              compact
              testID="source-none-confirm"
            />
          ) : null}
          {save.error ? <Text tone="danger">{fields.allowInsecure ?? fields.securityMode ?? fields.userCertificate ?? save.error.message}</Text> : null}
          <Button label="Save the source" onPress={() => void submit()} isBusy={save.isBusy} testID="source-save" />
        </>
      ) : null}
    </View>
  );
}

/** Fetches the server certificate, shows its thumbprint, and trusts it on the admin's word. */
function TrustRow({ source }: { source: VesselSource }) {
  const fetchCert = useServerCertificate();
  const trust = useTrustServer();
  const [cert, setCert] = useState<CertificateInfo | null>(null);
  if (source.securityPolicy === 'None') return null;
  return (
    <View style={styles.stack}>
      <Text variant="small">
        {source.vesselName}:{' '}
        {source.trustedThumbprint ? `server certificate trusted (SHA-1 ${source.trustedThumbprint})` : 'server certificate not trusted yet'}
      </Text>
      {cert ? (
        <>
          <Text variant="small" testID="server-thumbprint">
            {cert.subject} · valid {cert.validFrom.slice(0, 10)} to {cert.validTo.slice(0, 10)} · SHA-1 {cert.thumbprint} · SHA-256 {cert.sha256}
          </Text>
          <Text variant="small" tone="muted">
            Compare the thumbprint with the one the control system’s owner reads out before trusting it.
          </Text>
          <Button
            label="Trust this certificate"
            onPress={() => void trust.submit(source.vesselId, { thumbprint: cert.thumbprint }).then((r) => r && setCert(null))}
            isBusy={trust.isBusy}
            testID="server-trust"
          />
        </>
      ) : (
        <Button
          label="Show the server certificate"
          variant="secondary"
          onPress={() => void fetchCert.submit(source.vesselId).then(setCert)}
          isBusy={fetchCert.isBusy}
          testID="server-certificate"
        />
      )}
      {fetchCert.error || trust.error ? <Text tone="danger">{(fetchCert.error ?? trust.error)!.message}</Text> : null}
    </View>
  );
}

/** The site's control-system link for admins: each vessel's state, Yieldpoint's certificate, sources and trust. */
export function LinkAdmin() {
  const status = useLinkStatus();
  const sources = useVesselSources();
  if (status.error) return <ErrorState error={status.error} onRetry={status.retry} />;
  if (!status.data || !sources.data) return <Loader rows={3} label="Loading the control-system link" />;
  return (
    <Card>
      <Text variant="title" accessibilityRole="header">
        Control system (OPC UA, read-only)
      </Text>
      <Text variant="small" tone="muted">
        Yieldpoint reads each running batch’s vessel temperature and never writes to the control system.
        {status.data.certificate ? ` Its certificate for the server’s trust list: SHA-1 ${status.data.certificate.thumbprint}.` : ''}
        {status.data.userCertificate
          ? ` Its user certificate, for servers that log readers in by certificate: SHA-1 ${status.data.userCertificate.thumbprint}.`
          : ''}
      </Text>
      {status.data.links.length ? (
        <DataTable columns={STATUS_COLUMNS} rows={status.data.links} rowKey={(l) => String(l.vesselId)} caption="Link state per vessel" testID="link-status" />
      ) : (
        <Text tone="muted">No vessel reads the control system yet.</Text>
      )}
      {sources.data.sources.map((s) => (
        <TrustRow key={s.vesselId} source={s} />
      ))}
      <SourceForm sources={sources.data.sources} />
    </Card>
  );
}

const styles = StyleSheet.create({ stack: { gap: space.sm } });
