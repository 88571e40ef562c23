import { Link } from 'expo-router';
import { View } from 'react-native';
import { LogoMark } from '@/components/logo-mark';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

export default function NotFound() {
  return (
    <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', padding: 24, gap: 14, backgroundColor: theme.color.paper }} testID="not-found" role="main">
      <LogoMark size={40} />
      <Txt variant="title">No such page</Txt>
      <Txt variant="body" style={{ textAlign: 'center', maxWidth: 360 }}>
        The address does not lead anywhere in Quasilevel. It may have been mistyped, or the record was removed.
      </Txt>
      <Link href="/">
        <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Go to the overview</Txt>
      </Link>
    </View>
  );
}
