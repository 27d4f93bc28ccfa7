import { router, useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { ErrorState, Loader } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { MIN_PASSWORD_LENGTH } from '@/contracts/rules';
import { ROLE_LABELS } from '@/contracts/rules';
import { useAcceptInvite, useInvitePreview } from '@/hooks/use-accept-invite';
import { space, useColors } from '@/theme';

function AcceptForm({ token }: { token: string }) {
  const preview = useInvitePreview(token);
  const accept = useAcceptInvite();
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [mismatch, setMismatch] = useState(false);
  if (preview.error) return <ErrorState error={preview.error} />;
  if (!preview.data) return <Loader rows={2} label="Checking the invite" />;
  const p = preview.data;
  const submit = async () => {
    setMismatch(password !== repeat);
    if (password !== repeat) return;
    const out = await accept.submit({ token, name, password });
    if (out) router.replace({ pathname: '/sign-in', params: { email: out.email, welcome: '1' } });
  };
  const general = accept.error && !Object.keys(accept.error.fields).length ? accept.error.message : null;
  return (
    <Card>
      <Text variant="title">Join {p.siteName}</Text>
      <Text tone="muted" testID="accept-invite-who">
        {p.email} · {ROLE_LABELS[p.role]}
      </Text>
      <Field label="Your name" testID="accept-name" value={name} onChangeText={setName} autoComplete="name" error={accept.error?.fields.name} />
      <Field
        label="Password"
        testID="accept-password"
        value={password}
        onChangeText={setPassword}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters`}
        error={accept.error?.fields.password}
      />
      <Field label="Password again" testID="accept-password-repeat" value={repeat} onChangeText={setRepeat} secureTextEntry autoComplete="new-password" onSubmitEditing={submit} error={mismatch ? 'The two passwords differ' : undefined} />
      {general ? (
        <Text tone="danger" accessibilityRole="alert" testID="accept-error">
          {general}
        </Text>
      ) : null}
      <Button label="Set password" testID="accept-submit" onPress={submit} isBusy={accept.isSubmitting} />
    </Card>
  );
}

/** The page an invite mail links to: the invited person chooses a name and password, then signs in. */
export default function AcceptInvite() {
  const c = useColors();
  const { token } = useLocalSearchParams<{ token?: string }>();
  return (
    <KeyboardAvoidingView style={[styles.fill, { backgroundColor: c.navBackground }]} behavior="padding">
      <ScrollView contentContainerStyle={styles.center} keyboardShouldPersistTaps="handled">
        <View style={styles.column} testID="screen-accept-invite">
          <Text variant="figure" style={{ color: c.navActive }} accessibilityRole="header">
            Yieldpoint
          </Text>
          {token ? <AcceptForm token={token} /> : <ErrorState error={new Error('This invite link is not complete. Open the link from the mail again.')} />}
        </View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  center: { flexGrow: 1, justifyContent: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420, alignSelf: 'center', gap: space.xl },
});
