import { router } from 'expo-router';
import { AuthCard, MailLinkPage } from '@/components/shell/auth-card';
import { NewPasswordFields, useNewPassword } from '@/components/shell/new-password-fields';
import { ErrorState, Loader } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useResetPassword, useResetPreview } from '@/hooks/use-password-reset';

function ResetForm({ token }: { token: string }) {
  const preview = useResetPreview(token);
  const reset = useResetPassword();
  const pw = useNewPassword();
  if (preview.error) return <ErrorState error={preview.error} />;
  if (!preview.data) return <Loader rows={2} label="Checking the link" />;
  const submit = async () => {
    if (!pw.confirmed()) return;
    const out = await reset.submit({ token, password: pw.password });
    if (out) router.replace({ pathname: '/sign-in', params: { email: out.email, welcome: '1' } });
  };
  return (
    <AuthCard
      title="Set a new password"
      note={
        <Text tone="muted" testID="reset-who">
          {preview.data.email}
        </Text>
      }
      error={reset.error}
      errorTestID="reset-error"
      submit={{ label: 'Set password', testID: 'reset-submit', onPress: submit, isBusy: reset.isBusy }}
    >
      <NewPasswordFields state={pw} label="New password" testID="reset-password" error={reset.error?.fields.password} onSubmit={submit} />
    </AuthCard>
  );
}

/** The page a reset mail links to: the person chooses a new password, then signs in (their other sessions ended). */
export default function ResetPassword() {
  return (
    <MailLinkPage testID="screen-reset-password" linkName="reset">
      {(token) => <ResetForm token={token} />}
    </MailLinkPage>
  );
}
