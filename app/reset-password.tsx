import { router } from 'expo-router';
import { useState } from 'react';
import { AuthCard, MailLinkPage } from '@/components/shell/auth-card';
import { Field } from '@/components/ui/field';
import { ErrorState, Loader } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { MIN_PASSWORD_LENGTH } from '@/contracts/rules';
import { useResetPassword, useResetPreview } from '@/hooks/use-password-reset';

function ResetForm({ token }: { token: string }) {
  const preview = useResetPreview(token);
  const reset = useResetPassword();
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [mismatch, setMismatch] = useState(false);
  if (preview.error) return <ErrorState error={preview.error} />;
  if (!preview.data) return <Loader rows={2} label="Checking the link" />;
  const submit = async () => {
    setMismatch(password !== repeat);
    if (password !== repeat) return;
    const out = await reset.submit({ token, password });
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
      <Field
        label="New password"
        testID="reset-password"
        value={password}
        onChangeText={setPassword}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters`}
        error={reset.error?.fields.password}
      />
      <Field
        label="New password again"
        testID="reset-password-repeat"
        value={repeat}
        onChangeText={setRepeat}
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={submit}
        error={mismatch ? 'The two passwords differ' : undefined}
      />
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
