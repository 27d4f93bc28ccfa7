import { useState } from 'react';
import type { Role } from '../../contracts/roles';
import { useCreateInvite } from '../../hooks/use-create-invite';
import { Button, Card, Field, Text } from '../ui';
import { RoleChoice } from './role-choice';

/** Invites one person by e-mail with a role; a full site answers with the server's seat message. */
export function InviteCard() {
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('operator');
  const [sentTo, setSentTo] = useState<string | null>(null);
  const invite = useCreateInvite();
  const general = invite.error && !Object.keys(invite.error.fields).length ? invite.error.message : null;
  return (
    <Card testID="invite-card">
      <Text variant="title" accessibilityRole="header">
        Invite someone
      </Text>
      <Field
        label="E-mail"
        testID="invite-email"
        value={email}
        onChangeText={setEmail}
        autoCapitalize="none"
        inputMode="email"
        keyboardType="email-address"
        error={invite.error?.fields.email}
      />
      <Text variant="small" weight="semibold">
        Role
      </Text>
      <RoleChoice value={role} onChange={setRole} testID="invite-role" />
      {general ? (
        <Text tone="danger" accessibilityRole="alert" testID="invite-error">
          {general}
        </Text>
      ) : null}
      {sentTo ? (
        <Text tone="success" accessibilityLiveRegion="polite" testID="invite-sent">
          Invite queued for {sentTo}. The mail's status is under Outgoing mail.
        </Text>
      ) : null}
      <Button
        label="Send invite"
        testID="invite-submit"
        isBusy={invite.isBusy}
        onPress={async () => {
          setSentTo(null);
          const out = await invite.submit({ email, role });
          if (out) {
            setSentTo(out.email);
            setEmail('');
          }
        }}
      />
    </Card>
  );
}
