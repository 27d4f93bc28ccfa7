import { router } from 'expo-router';
import { CautionsList } from '@/components/shell/cautions';
import { Button } from '@/components/ui/button';
import { Screen } from '@/components/ui/screen';

export default function Cautions() {
  return (
    <Screen
      title="Cautions"
      subtitle="What Yieldpoint assumes you know before you act on its advice."
      testID="screen-cautions"
      actions={<Button label="Back" variant="secondary" onPress={() => (router.canGoBack() ? router.back() : router.replace('/'))} />}
    >
      <CautionsList />
    </Screen>
  );
}
