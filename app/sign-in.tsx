import { Redirect, router, useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import { HOME } from '@/components/shell/navigation';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { useSession } from '@/hooks/use-session';
import { useSignIn } from '@/hooks/use-sign-in';
import { space, useColors } from '@/theme';

export default function SignIn() {
  const c = useColors();
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
    <KeyboardAvoidingView style={[styles.fill, { backgroundColor: c.navBackground }]} behavior="padding">
      <ScrollView contentContainerStyle={styles.center} keyboardShouldPersistTaps="handled">
        <View style={styles.column} testID="screen-sign-in">
          <View style={styles.brand}>
            <Text variant="figure" style={{ color: c.navActive }} accessibilityRole="header">
              Yieldpoint
            </Text>
            <Text style={{ color: c.navText }}>The batch temperature that makes the most product, and its follow-through.</Text>
          </View>
          <Card>
            <Text variant="title">Sign in</Text>
            {params.welcome ? (
              <Text tone="success" testID="sign-in-welcome">
                Your password is set. Sign in to start.
              </Text>
            ) : null}
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
            {error && !Object.keys(error.fields).length ? (
              <Text tone="danger" accessibilityRole="alert" testID="sign-in-error">
                {error.message}
              </Text>
            ) : null}
            <Button label="Sign in" testID="sign-in-submit" onPress={submit} isBusy={isSubmitting} />
            <Text tone="muted" testID="sign-in-locked-out">
              Forgotten your password, or told to wait? After a few wrong passwords each try waits a little longer (at most a minute); a browser you signed in with before is not held up. Your site admin can send you a reset link by e-mail.
            </Text>
          </Card>
        </View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  center: { flexGrow: 1, justifyContent: 'center', padding: space.lg },
  column: { width: '100%', maxWidth: 420, alignSelf: 'center', gap: space.xl },
  brand: { gap: space.sm },
});
