import { router } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { SessionUser } from '../../contracts/session';
import { ROLE_LABELS } from '../../contracts/rules';
import { font, radius, sidebarWidth, space, touchTarget, useColors } from '../../theme';
import { Icon } from '../icons';
import { Text } from '../ui/text';
import { navItemsFor } from './navigation';

type Props = { activeName: string | undefined; user: SessionUser | null; layout: 'bottom' | 'side' };

/** The role's places: a bottom bar on a phone, a sidebar on a wide screen. Empty until the user is known. */
export function NavBar({ activeName, user, layout }: Props) {
  const c = useColors();
  const items = user ? navItemsFor(user.role) : [];
  const side = layout === 'side';
  return (
    <View role="navigation" aria-label="Main" testID="nav" style={[side ? styles.side : styles.bottom, { backgroundColor: c.navBackground }]}>
      {side ? (
        <View style={styles.brand}>
          <Text variant="title" style={{ color: c.navActive }}>
            Yieldpoint
          </Text>
          <Text variant="caption" style={{ color: c.navText }}>
            {user?.siteName}
          </Text>
        </View>
      ) : null}
      <View style={side ? styles.sideItems : styles.bottomItems}>
        {items.map((item) => {
          const isActive = item.name === activeName;
          const fg = isActive ? c.navActiveText : c.navText;
          return (
            <Pressable
              key={item.name}
              role="link"
              accessibilityLabel={item.label}
              accessibilityState={{ selected: isActive }}
              aria-current={isActive ? 'page' : undefined}
              testID={`nav-${item.name}`}
              onPress={() => router.navigate(item.href)}
              style={[side ? styles.sideItem : styles.bottomItem, isActive && { backgroundColor: c.navActive }]}
            >
              <Icon name={item.icon} color={fg} size={side ? 20 : 22} />
              <Text variant={side ? 'body' : 'caption'} style={{ color: fg, fontFamily: isActive ? font.semibold : font.regular }}>
                {item.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {side ? (
        <View style={styles.sideFooter}>
          <Pressable role="link" accessibilityLabel="Cautions" testID="nav-cautions" onPress={() => router.navigate('/cautions')} style={styles.sideItem}>
            <Icon name="caution" color={c.navActive} size={20} />
            <Text style={{ color: c.navText }}>Cautions</Text>
          </Pressable>
          {user ? (
            <Text variant="caption" style={{ color: c.navText }}>
              {user.name} · {ROLE_LABELS[user.role]}
            </Text>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  bottom: { borderTopWidth: 0, paddingHorizontal: space.xs, paddingVertical: space.xs },
  bottomItems: { flexDirection: 'row', justifyContent: 'space-around', minHeight: touchTarget + 8 },
  bottomItem: {
    flex: 1,
    minHeight: touchTarget + 8,
    alignItems: 'center',
    justifyContent: 'center',
    gap: space.xxs,
    borderRadius: radius.md,
    marginHorizontal: space.xxs,
  },
  side: { width: sidebarWidth, height: '100%', paddingVertical: space.xl, paddingHorizontal: space.md, gap: space.xl },
  brand: { paddingHorizontal: space.sm, gap: space.xxs },
  sideItems: { gap: space.xs, flex: 1 },
  sideItem: { flexDirection: 'row', alignItems: 'center', gap: space.md, minHeight: touchTarget, paddingHorizontal: space.md, borderRadius: radius.md },
  sideFooter: { gap: space.sm, paddingHorizontal: space.sm },
});
