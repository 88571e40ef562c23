import { Link, usePathname } from 'expo-router';
import { Pressable, ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';
import type { ReactNode } from 'react';
import { LogoMark } from '@/components/logo-mark';
import { NAV_ITEMS } from '@/components/nav-items';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import type { Me } from '@/lib/api/session';

function isActive(pathname: string, match: string) {
  return match === '/' ? pathname === '/' : pathname === match || pathname.startsWith(match + '/');
}

// Link asChild merges props by object spread, so an array style would reach the DOM as
// indexed properties: always hand it a flattened style.

/**
 * The signed-in frame: a side navigation on wide screens, a top bar with a scrolling section
 * strip on phones. Only sections the role may use are listed. Landmarks: the frame is the banner
 * (header) holding the navigation; the screen is the main region.
 */
export function AppShell({ me, children }: { me: Me; children: ReactNode }) {
  const { width } = useWindowDimensions();
  const pathname = usePathname();
  const wide = width >= theme.wideFrom;
  const items = NAV_ITEMS.filter((i) => !i.needs || me.permissions.includes(i.needs));

  if (wide) {
    return (
      <View style={styles.row}>
        <View style={styles.side} testID="nav-side" role="banner">
          <View style={{ padding: 18 }}>
            <LogoMark withName onDark />
          </View>
          <View style={{ gap: 2, paddingHorizontal: 10 }} role="navigation" aria-label="Sections">
            {items.map((i) => {
              const active = isActive(pathname, i.match);
              return (
                <Link key={i.match} href={i.href} asChild>
                  <Pressable style={StyleSheet.flatten([styles.sideItem, active && styles.sideItemActive])} testID={`nav-${i.short.toLowerCase()}`} aria-current={active ? 'page' : undefined}>
                    <View style={[styles.tick, active && styles.tickActive]} />
                    <Txt variant="label" style={{ color: active ? theme.color.navActive : theme.color.navText, fontSize: 14 }}>
                      {i.label}
                    </Txt>
                  </Pressable>
                </Link>
              );
            })}
          </View>
          <View style={styles.who}>
            <Txt variant="label" style={{ color: '#fff' }} numberOfLines={1}>
              {me.user.name}
            </Txt>
            <Txt variant="caption" style={{ color: theme.color.navText }} numberOfLines={1}>
              {ROLE_LABELS[me.role]} · {me.organization.name}
            </Txt>
          </View>
        </View>
        <View style={styles.main} role="main">{children}</View>
      </View>
    );
  }

  return (
    <View style={styles.col}>
      <View role="banner">
        <View style={styles.top}>
          <LogoMark withName onDark size={24} />
          <Txt variant="caption" style={{ color: theme.color.navText }} numberOfLines={1} testID="role-badge">
            {ROLE_LABELS[me.role]}
          </Txt>
        </View>
        <View style={styles.stripWrap} role="navigation" aria-label="Sections">
          <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.strip} testID="nav-strip">
            {items.map((i) => {
              const active = isActive(pathname, i.match);
              return (
                <Link key={i.match} href={i.href} asChild>
                  <Pressable style={StyleSheet.flatten([styles.chip, active && styles.chipActive])} testID={`nav-${i.short.toLowerCase()}`} aria-current={active ? 'page' : undefined}>
                    <Txt variant="label" style={{ color: active ? '#fff' : theme.color.inkSoft }}>
                      {i.short}
                    </Txt>
                  </Pressable>
                </Link>
              );
            })}
          </ScrollView>
        </View>
      </View>
      <View style={styles.main} role="main">{children}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flex: 1, flexDirection: 'row', backgroundColor: theme.color.paper },
  col: { flex: 1, backgroundColor: theme.color.paper },
  side: { width: 232, backgroundColor: theme.color.navBg, paddingBottom: 16 },
  sideItem: { flexDirection: 'row', alignItems: 'center', gap: 10, paddingVertical: 10, paddingHorizontal: 10, borderRadius: theme.radius.m },
  sideItemActive: { backgroundColor: '#1D2942' },
  tick: { width: 3, height: 16, borderRadius: 2, backgroundColor: 'transparent' },
  tickActive: { backgroundColor: '#2BB3A3' },
  who: { marginTop: 'auto', paddingHorizontal: 18, gap: 2 },
  main: { flex: 1, minWidth: 0 },
  top: {
    backgroundColor: theme.color.navBg,
    paddingHorizontal: 14,
    paddingVertical: 10,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: 12,
  },
  stripWrap: { backgroundColor: theme.color.surface, borderBottomWidth: 1, borderBottomColor: theme.color.line },
  strip: { paddingHorizontal: 10, paddingVertical: 8, gap: 6 },
  chip: { paddingHorizontal: 12, paddingVertical: 6, borderRadius: 999, backgroundColor: theme.color.sunken },
  chipActive: { backgroundColor: theme.color.electron },
});
