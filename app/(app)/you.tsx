import { router } from 'expo-router';
import { useState } from 'react';
import { CautionsList } from '@/components/shell/cautions';
import { Button, Card, Screen, Text } from '@/components/ui';
import { Field } from '@/components/ui/field';
import { MIN_PASSWORD_LENGTH } from '@/contracts/rules';
import { useChangePassword } from '@/hooks/use-password-reset';
import { ROLE_LABELS } from '@/contracts/rules';
import { useSession } from '@/hooks/use-session';
import { useSignOut } from '@/hooks/use-sign-out';

function ChangePasswordCard() {
  const change = useChangePassword();
  const [current, setCurrent] = useState('');
  const [next, setNext] = useState('');
  const [done, setDone] = useState(false);
  const submit = async () => {
    setDone(false);
    const ok = await change.submit({ currentPassword: current, newPassword: next });
    if (ok) {
      setDone(true);
      setCurrent('');
      setNext('');
    }
  };
  const general = change.error && !Object.keys(change.error.fields).length ? change.error.message : null;
  return (
    <Card>
      <Text weight="semibold">Change your password</Text>
      <Field
        label="Current password"
        testID="you-current-password"
        value={current}
        onChangeText={setCurrent}
        secureTextEntry
        autoComplete="current-password"
        error={change.error?.fields.currentPassword}
      />
      <Field
        label="New password"
        testID="you-new-password"
        value={next}
        onChangeText={setNext}
        secureTextEntry
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters; your other sessions end`}
        error={change.error?.fields.newPassword}
        onSubmitEditing={submit}
      />
      {general ? (
        <Text tone="danger" accessibilityRole="alert">
          {general}
        </Text>
      ) : null}
      {done ? (
        <Text tone="success" testID="you-password-changed">
          Password changed; you are signed out everywhere else.
        </Text>
      ) : null}
      <Button label="Change password" variant="secondary" testID="you-change-password" onPress={submit} isBusy={change.isBusy} />
    </Card>
  );
}

export default function YouScreen() {
  const { session } = useSession();
  const signOut = useSignOut();
  if (!session) return null;
  const { user } = session;
  return (
    <Screen title="You" subtitle={`${user.siteName}`} testID="screen-you">
      <Card>
        <Text variant="title" testID="you-name">
          {user.name}
        </Text>
        <Text tone="muted">{user.email}</Text>
        <Text testID="you-role">{ROLE_LABELS[user.role]}</Text>
        <Button
          label="Sign out"
          variant="secondary"
          testID="sign-out"
          onPress={async () => {
            await signOut();
            router.replace('/sign-in');
          }}
        />
      </Card>
      <ChangePasswordCard />
      <Text variant="title" accessibilityRole="header">
        Cautions
      </Text>
      <CautionsList />
    </Screen>
  );
}
