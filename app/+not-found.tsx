import { Link } from 'expo-router';
import { Screen } from '@/components/ui/screen';
import { Text } from '@/components/ui/text';

export default function NotFound() {
  return (
    <Screen title="Nothing here" subtitle="This address does not match a Yieldpoint screen." testID="screen-not-found">
      <Link href="/" accessibilityRole="link">
        <Text tone="primary" weight="semibold">
          Go to your home screen
        </Text>
      </Link>
    </Screen>
  );
}
