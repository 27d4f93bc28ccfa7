import { router } from 'expo-router';
import { useState } from 'react';
import { AuthCard, MailLinkPage } from '@/components/shell/auth-card';
import { NewPasswordFields, useNewPassword } from '@/components/shell/new-password-fields';
import { Field } from '@/components/ui/field';
import { ErrorState, Loader } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { ROLE_LABELS } from '@/contracts/rules';
import { useAcceptInvite, useInvitePreview } from '@/hooks/use-accept-invite';

function AcceptForm({ token }: { token: string }) {
  const preview = useInvitePreview(token);
  const accept = useAcceptInvite();
  const [name, setName] = useState('');
  const pw = useNewPassword();
  if (preview.error) return <ErrorState error={preview.error} />;
  if (!preview.data) return <Loader rows={2} label="Checking the invite" />;
  const p = preview.data;
  const submit = async () => {
    if (!pw.confirmed()) return;
    const out = await accept.submit({ token, name, password: pw.password });
    if (out) router.replace({ pathname: '/sign-in', params: { email: out.email, welcome: '1' } });
  };
  return (
    <AuthCard
      title={`Join ${p.siteName}`}
      note={
        <Text tone="muted" testID="accept-invite-who">
          {p.email} · {ROLE_LABELS[p.role]}
        </Text>
      }
      error={accept.error}
      errorTestID="accept-error"
      submit={{ label: 'Set password', testID: 'accept-submit', onPress: submit, isBusy: accept.isBusy }}
    >
      <Field label="Your name" testID="accept-name" value={name} onChangeText={setName} autoComplete="name" error={accept.error?.fields.name} />
      <NewPasswordFields state={pw} label="Password" testID="accept-password" error={accept.error?.fields.password} onSubmit={submit} />
    </AuthCard>
  );
}

/** The page an invite mail links to: the invited person chooses a name and password, then signs in. */
export default function AcceptInvite() {
  return (
    <MailLinkPage testID="screen-accept-invite" linkName="invite">
      {(token) => <AcceptForm token={token} />}
    </MailLinkPage>
  );
}
