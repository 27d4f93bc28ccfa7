import { router } from 'expo-router';
import { CautionsList } from '@/components/shell/cautions';
import { Button, Card, Screen, Text } from '@/components/ui';
import { ROLE_LABELS } from '@/contracts/rules';
import { useSession } from '@/hooks/use-session';
import { useSignOut } from '@/hooks/use-sign-out';

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
      <Text variant="title" accessibilityRole="header">
        Cautions
      </Text>
      <CautionsList />
    </Screen>
  );
}
