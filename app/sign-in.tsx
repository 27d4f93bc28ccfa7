import { Redirect, router, useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { AuthCard, AuthPage } from '@/components/shell/auth-card';
import { HOME } from '@/components/shell/navigation';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useSession } from '@/hooks/use-session';
import { useSignIn } from '@/hooks/use-sign-in';

export default function SignIn() {
  const { session } = useSession();
  const { submit: signIn, error, isBusy: isSubmitting } = useSignIn();
  // An accepted invite lands here with the address filled in.
  const params = useLocalSearchParams<{ email?: string; welcome?: string }>();
  const [email, setEmail] = useState(params.email ?? '');
  const [password, setPassword] = useState('');
  if (session) return <Redirect href={HOME[session.user.role]} />;

  const submit = async () => {
    const s = await signIn({ email, password });
    if (s) router.replace(HOME[s.user.role]);
  };
  const fieldError = (name: string) => error?.fields[name];
  return (
    <AuthPage testID="screen-sign-in" tagline="The batch temperature that makes the most product, and its follow-through.">
      <AuthCard
        title="Sign in"
        note={
          params.welcome ? (
            <Text tone="success" testID="sign-in-welcome">
              Your password is set. Sign in to start.
            </Text>
          ) : null
        }
        error={error}
        errorTestID="sign-in-error"
        submit={{ label: 'Sign in', testID: 'sign-in-submit', onPress: submit, isBusy: isSubmitting }}
        footer={
          <Text tone="muted" testID="sign-in-locked-out">
            Forgotten your password, or told to wait? After a few wrong passwords each try waits a little longer (at most a minute); a browser you signed in
            with before is not held up. Your site admin can send you a reset link by e-mail.
          </Text>
        }
      >
        <Field
          label="E-mail"
          testID="sign-in-email"
          value={email}
          onChangeText={setEmail}
          autoCapitalize="none"
          autoComplete="email"
          keyboardType="email-address"
          inputMode="email"
          error={fieldError('email')}
        />
        <Field
          label="Password"
          testID="sign-in-password"
          value={password}
          onChangeText={setPassword}
          secureTextEntry
          autoComplete="current-password"
          onSubmitEditing={submit}
          error={fieldError('password')}
        />
      </AuthCard>
    </AuthPage>
  );
}
