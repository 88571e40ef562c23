import { Text } from 'react-native';
import type { TextProps } from 'react-native';
import { theme } from '@/components/theme';

type Variant = 'title' | 'heading' | 'body' | 'label' | 'caption' | 'figure' | 'figureLarge';

const styles = {
  title: { fontFamily: theme.font.semibold, fontSize: 24, lineHeight: 30, color: theme.color.ink },
  heading: { fontFamily: theme.font.semibold, fontSize: 17, lineHeight: 22, color: theme.color.ink },
  body: { fontFamily: theme.font.regular, fontSize: 15, lineHeight: 21, color: theme.color.ink },
  label: { fontFamily: theme.font.medium, fontSize: 13, lineHeight: 17, color: theme.color.inkSoft },
  caption: { fontFamily: theme.font.regular, fontSize: 12, lineHeight: 16, color: theme.color.muted },
  figure: { fontFamily: theme.font.mono, fontSize: 14, lineHeight: 19, color: theme.color.ink },
  figureLarge: { fontFamily: theme.font.monoBold, fontSize: 22, lineHeight: 28, color: theme.color.ink },
} as const;

/** Text in one of Quasilevel's type styles; figures use the mono face so digits line up. */
export function Txt({ variant = 'body', style, ...rest }: TextProps & { variant?: Variant }) {
  return <Text {...rest} style={[styles[variant], style]} />;
}
