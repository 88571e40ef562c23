import Svg, { Rect } from 'react-native-svg';
import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/**
 * Quasilevel's mark: two offset levels (electron teal above, hole amber below) joined by the
 * gap between them — the splitting that sets a cell's voltage.
 */
export function LogoMark({ size = 28, withName = false, onDark = false }: { size?: number; withName?: boolean; onDark?: boolean }) {
  return (
    <View style={{ flexDirection: 'row', alignItems: 'center', gap: 10 }} accessibilityLabel="Quasilevel">
      <Svg width={size} height={size} viewBox="0 0 32 32">
        <Rect x="0" y="0" width="32" height="32" rx="7" fill={onDark ? '#1D2942' : theme.color.ink} />
        <Rect x="5" y="7" width="18" height="4" rx="1" fill="#2BB3A3" />
        <Rect x="9" y="21" width="18" height="4" rx="1" fill="#E9A21B" />
        <Rect x="15" y="11" width="2" height="10" fill={theme.color.paper} opacity={0.85} />
      </Svg>
      {withName ? (
        <Txt variant="heading" style={{ color: onDark ? '#FFFFFF' : theme.color.ink, letterSpacing: 0.3 }}>
          Quasilevel
        </Txt>
      ) : null}
    </View>
  );
}
