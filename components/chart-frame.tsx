import { useState } from 'react';
import type { ReactNode } from 'react';
import { View } from 'react-native';
import type { LayoutChangeEvent } from 'react-native';
import { Txt } from '@/components/txt';

/** Measures the width it is given and renders `children(width)`; charts size themselves to it. */
export function ChartFrame({ title, height, children, testID, caption }: { title?: string; height: number; children: (width: number) => ReactNode; testID?: string; caption?: string }) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.floor(e.nativeEvent.layout.width);
    if (Math.abs(w - width) > 2) setWidth(w);
  };
  return (
    <View style={{ gap: 4, minWidth: 0 }} testID={testID}>
      {title ? <Txt variant="label">{title}</Txt> : null}
      <View onLayout={onLayout} style={{ width: '100%', height }}>
        {width > 0 ? children(width) : null}
      </View>
      {caption ? <Txt variant="caption">{caption}</Txt> : null}
    </View>
  );
}
