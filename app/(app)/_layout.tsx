import { Redirect } from 'expo-router';
import { Tabs } from 'expo-router/js-tabs';
import { StyleSheet, View } from 'react-native';
import { FirstRunNotice } from '@/components/shell/first-run-notice';
import { NavBar } from '@/components/shell/nav-bar';
import { NAV_ITEMS } from '@/components/shell/navigation';
import { TopBar } from '@/components/shell/top-bar';
import { ErrorState, Loader } from '@/components/ui/states';
import { useSession } from '@/hooks/use-session';
import { space, useBreakpoint, useColors } from '@/theme';
import { isBuildSnapshot } from '@/web/snapshot';

export default function SignedInLayout() {
  const { session, error, mutate } = useSession();
  const { isWide } = useBreakpoint();
  const c = useColors();
  if (error) {
    return (
      <View style={[styles.center, { backgroundColor: c.background }]}>
        <ErrorState error={error} onRetry={() => mutate()} />
      </View>
    );
  }
  // The build-time snapshot has no session: it draws the frame and the screen, without the role's navigation.
  if (session === undefined && !isBuildSnapshot) {
    return (
      <View style={[styles.center, { backgroundColor: c.background }]}>
        <Loader label="Checking your sign-in" />
      </View>
    );
  }
  if (session === null) return <Redirect href="/sign-in" />;
  const user = session?.user ?? null;
  return (
    <View style={[styles.fill, { backgroundColor: c.background }]}>
      {isWide ? null : <TopBar siteName={user?.siteName ?? ''} />}
      <Tabs
        tabBar={(props) => <NavBar user={user} layout={isWide ? 'side' : 'bottom'} activeName={props.state.routes[props.state.index]?.name} />}
        screenOptions={{ headerShown: false, tabBarPosition: isWide ? 'left' : 'bottom' }}
      >
        <Tabs.Screen name="index" options={{ href: null }} />
        {NAV_ITEMS.map((item) => (
          <Tabs.Screen key={item.name} name={item.name} options={{ title: `${item.label} · Yieldpoint` }} />
        ))}
      </Tabs>
      {user && !user.cautionsAcknowledgedAt ? <FirstRunNotice /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  center: { flex: 1, justifyContent: 'center', padding: space.xl },
});
