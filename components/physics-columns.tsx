import type { ReactNode } from 'react';
import { View } from 'react-native';

/** Side by side from `wide` width, stacked on a phone. */
export function PhysicsColumns({ wide, children, align = 'flex-start' }: { wide: boolean; children: ReactNode; align?: 'flex-start' | 'stretch' }) {
  return <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: align }]}>{children}</View>;
}
