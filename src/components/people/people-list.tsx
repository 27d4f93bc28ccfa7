import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Role } from '../../contracts/roles';
import { ROLE_LABELS } from '../../contracts/rules';
import type { Invite } from '../../contracts/invites';
import type { User } from '../../contracts/users';
import { isoDate } from '../../format';
import { useSendReset } from '../../hooks/use-password-reset';
import { useRevokeInvite } from '../../hooks/use-revoke-invite';
import { useUpdateUser } from '../../hooks/use-update-user';
import { radius, space, useColors } from '../../theme';
import { Button, Text } from '../ui';
import { RoleChoice } from './role-choice';

function PersonRow({ user, isSelf }: { user: User; isSelf: boolean }) {
  const c = useColors();
  const [editing, setEditing] = useState(false);
  const [role, setRole] = useState<Role>(user.role);
  const update = useUpdateUser();
  const reset = useSendReset();
  const [resetSentTo, setResetSentTo] = useState<string | null>(null);
  return (
    <View style={[styles.row, { borderColor: c.border, backgroundColor: c.surface }]} testID={`person-${user.id}`}>
      <View style={styles.head}>
        <View style={styles.who}>
          <Text weight="semibold">{user.name}</Text>
          <Text variant="small" tone="muted">
            {user.email}
          </Text>
          <Text variant="small">
            {ROLE_LABELS[user.role]} ·{' '}
            <Text variant="small" tone={user.isActive ? 'success' : 'muted'}>
              {user.isActive ? 'Active' : 'Deactivated'}
            </Text>
          </Text>
        </View>
        {isSelf ? (
          <Text variant="small" tone="muted">
            You
          </Text>
        ) : (
          <Button
            label={editing ? 'Close' : 'Change'}
            variant="ghost"
            compact
            accessibilityLabel={`Change ${user.name}`}
            onPress={() => setEditing(!editing)}
            testID={`person-${user.id}-edit`}
          />
        )}
      </View>
      {editing ? (
        <View style={styles.editor}>
          <RoleChoice value={role} onChange={setRole} testID={`person-${user.id}-role`} />
          {(update.error ?? reset.error) ? (
            <Text tone="danger" variant="small" accessibilityRole="alert">
              {(update.error ?? reset.error)!.message}
            </Text>
          ) : null}
          {resetSentTo ? (
            <Text tone="success" variant="small" testID={`person-${user.id}-reset-sent`}>
              Reset link sent to {resetSentTo}; it works once, for 24 hours.
            </Text>
          ) : null}
          <View style={styles.actions}>
            <Button
              label="Save role"
              compact
              disabled={role === user.role}
              isBusy={update.isBusy}
              onPress={() => void update.submit({ id: user.id, patch: { role } })}
            />
            <Button
              label={user.isActive ? 'Deactivate' : 'Reactivate'}
              variant={user.isActive ? 'danger' : 'secondary'}
              compact
              isBusy={update.isBusy}
              onPress={() => void update.submit({ id: user.id, patch: { isActive: !user.isActive } })}
            />
            {user.isActive ? (
              <Button
                label="Send reset link"
                variant="secondary"
                compact
                testID={`person-${user.id}-reset`}
                isBusy={reset.isBusy}
                onPress={async () => {
                  const sent = await reset.submit(user.id);
                  if (sent) setResetSentTo(sent.to);
                }}
              />
            ) : null}
          </View>
        </View>
      ) : null}
    </View>
  );
}

export function PeopleList({ users, selfId }: { users: User[]; selfId: number }) {
  return (
    <View style={styles.list} testID="users-table" accessibilityLabel="People at this site">
      {users.map((u) => (
        <PersonRow key={u.id} user={u} isSelf={u.id === selfId} />
      ))}
    </View>
  );
}

export function PendingInvites({ invites }: { invites: Invite[] }) {
  const c = useColors();
  const revoke = useRevokeInvite();
  return (
    <View style={styles.list} testID="pending-invites">
      {invites.map((i) => (
        <View key={i.id} style={[styles.row, styles.head, { borderColor: c.border, backgroundColor: c.surface }]} testID="pending-invite">
          <View style={styles.who}>
            <Text weight="semibold">{i.email}</Text>
            <Text variant="small" tone="muted">
              {ROLE_LABELS[i.role]} · invited {isoDate(i.createdAt)} · link valid until {isoDate(i.expiresAt)}
            </Text>
          </View>
          <Button
            label="Withdraw"
            variant="ghost"
            compact
            accessibilityLabel={`Withdraw the invite for ${i.email}`}
            isBusy={revoke.isBusy}
            onPress={() => void revoke.submit(i.id)}
          />
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  row: { borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: space.sm },
  head: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.md },
  who: { flexShrink: 1, gap: space.xxs },
  editor: { gap: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
