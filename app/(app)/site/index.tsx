import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { MeasurementSdCard } from '@/components/calibration/measurement-sd-card';
import { LinkAdmin } from '@/components/control-link/link-admin';
import { InviteCard } from '@/components/people/invite-card';
import { OutboxList } from '@/components/people/outbox-list';
import { PendingInvites, PeopleList } from '@/components/people/people-list';
import { CurrencyCard } from '@/components/site/currency-card';
import { can } from '@/contracts/permissions';
import { Button, Columns, EmptyState, ErrorState, Figure, Loader, Screen, Text } from '@/components/ui';
import { useInvites } from '@/hooks/use-invites';
import { useMailOutbox } from '@/hooks/use-mail-outbox';
import { useSession } from '@/hooks/use-session';
import { useSite } from '@/hooks/use-site';
import { useUsers } from '@/hooks/use-users';
import { space, useBreakpoint } from '@/theme';

function People() {
  const users = useUsers();
  const invites = useInvites();
  const { session } = useSession();
  if (users.error) return <ErrorState error={users.error} onRetry={users.retry} />;
  if (!users.data || !session) return <Loader rows={5} label="Loading people" />;
  return (
    <>
      <PeopleList users={users.data.users} selfId={session.user.id} />
      <InviteCard />
      {invites.error ? (
        <ErrorState error={invites.error} onRetry={invites.retry} />
      ) : invites.data && invites.data.invites.length > 0 ? (
        <>
          <Text variant="title" accessibilityRole="header">
            Open invites
          </Text>
          <PendingInvites invites={invites.data.invites} />
        </>
      ) : null}
    </>
  );
}

function Outbox() {
  const outbox = useMailOutbox();
  if (outbox.error) return <ErrorState error={outbox.error} onRetry={outbox.retry} />;
  if (!outbox.data) return <Loader rows={2} label="Loading outgoing mail" />;
  if (!outbox.data.messages.length)
    return <EmptyState title="No mail yet" message="Invites and notices sent from this site are listed here with their delivery state." />;
  return <OutboxList messages={outbox.data.messages} />;
}

function SiteBody() {
  const site = useSite();
  const { session } = useSession();
  const { isWide } = useBreakpoint();
  if (site.error) return <ErrorState error={site.error} onRetry={site.retry} />;
  // The frame is drawn before the site has loaded (and so in the page's HTML snapshot): the figures hold a dash
  // until their counts arrive, so nothing moves and the largest text is on screen with the first paint.
  // The snapshot, which knows no session, draws the frame of those who may change the settings.
  const counts = site.data?.counts;
  const shown = (n: number | undefined) => n ?? '–';
  return (
    <>
      <Text variant="small" tone="muted" numberOfLines={2} testID="site-zone">
        {site.data ? `${site.data.name} · times in ${site.data.timeZone}` : 'Loading the site’s name and time zone…'}
      </Text>
      <View style={[styles.figures, isWide && styles.figuresWide]}>
        <Figure label="active users" value={shown(counts?.activeUsers)} testID="site-active-users" />
        <Figure label="vessels" value={shown(counts?.vessels)} testID="site-vessels" />
        <Figure label="enzymes" value={shown(counts?.enzymes)} testID="site-enzymes" />
        <Figure label="lots awaiting a decision" value={shown(counts?.quarantinedLots)} testID="site-quarantined" />
      </View>
      <CurrencyCard key={site.data?.currency ?? ''} currency={site.data?.currency} canChange={!session || can(session.user.role, 'site.edit')} />
      <MeasurementSdCard canChange={!session || can(session.user.role, 'calibrations.settings')} />
      <LinkAdmin />
      <Columns gap={space.md}>
        <>
          <Text variant="title" accessibilityRole="header">
            People
          </Text>
          <People />
        </>
        <>
          <Text variant="title" accessibilityRole="header">
            Outgoing mail
          </Text>
          <Outbox />
        </>
      </Columns>
    </>
  );
}

export default function SiteScreen() {
  return (
    <Screen
      title="Site"
      subtitle="People, roles, settings and mail."
      testID="screen-site"
      actions={<Button label="Audit trail" variant="secondary" testID="open-audit" onPress={() => router.navigate('/audit')} />}
    >
      <SiteBody />
    </Screen>
  );
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  figuresWide: { flexWrap: 'nowrap' },
});
