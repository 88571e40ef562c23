import { useRef, useState } from 'react';
import type { ReactNode } from 'react';
import { Platform, View } from 'react-native';
import type { GestureResponderEvent, PointerEvent } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { inPlot, nearestPoint, toPixel } from '@/lib/charts/plot-frame';
import type { PlotFrame, Point } from '@/lib/charts/plot-frame';

/** How far outside the plotting area (px) a pointer still reads the nearest point. */
const SLACK_PX = 10;

/**
 * Wraps a drawn chart and reads the measured point nearest the mouse or finger: a ring on the
 * point and a line of text under the chart (a polite live region, so screen readers hear it
 * without a keyboard focus). On the web it follows pointer events (mouse hover, pen, a tap); on
 * native a touch and drag through the responder system.
 */
export function ChartPointer({
  frame,
  points,
  describe,
  hint,
  children,
  testID,
}: {
  frame: PlotFrame;
  points: readonly Point[];
  describe: (index: number) => string;
  hint: string;
  children: ReactNode;
  testID?: string;
}) {
  const [picked, setPicked] = useState<number | null>(null);
  const host = useRef<View>(null);
  const pick = (px: number, py: number) => {
    const hit = inPlot(frame, px, py, SLACK_PX) ? nearestPoint(frame, points, px, py) : null;
    setPicked(hit ? hit.index : null);
  };
  const onPointer = (e: PointerEvent) => {
    // react-native-web hands over the DOM event; the host view is a DOM element there.
    const el = host.current as unknown as { getBoundingClientRect?: () => { left: number; top: number } } | null;
    if (!el?.getBoundingClientRect) return;
    const r = el.getBoundingClientRect();
    pick(e.nativeEvent.clientX - r.left, e.nativeEvent.clientY - r.top);
  };
  const onTouch = (e: GestureResponderEvent) => pick(e.nativeEvent.locationX, e.nativeEvent.locationY);
  const handlers =
    Platform.OS === 'web'
      ? {
          onPointerMove: onPointer,
          onPointerDown: onPointer,
          // A finger lifts (and "leaves") right after a tap: keep that reading on screen.
          onPointerLeave: (e: PointerEvent) => (e.nativeEvent.pointerType === 'touch' ? undefined : setPicked(null)),
        }
      : { onStartShouldSetResponder: () => true, onResponderGrant: onTouch, onResponderMove: onTouch };
  const at = picked != null && points[picked] ? toPixel(frame, points[picked]) : null;
  return (
    <View style={{ gap: 2 }}>
      <View ref={host} style={{ width: frame.width, height: frame.height }} testID={testID ? `${testID}-plot` : undefined} {...handlers}>
        {children}
        {at ? (
          <View
            pointerEvents="none"
            testID={testID ? `${testID}-marker` : undefined}
            style={{ position: 'absolute', left: at.px - 6, top: at.py - 6, width: 12, height: 12, borderRadius: 6, borderWidth: 2, borderColor: theme.color.danger }}
          />
        ) : null}
      </View>
      {/* Two lines' room on a phone, where a reading with a device id wraps: the legend below does not jump. */}
      <Txt variant="caption" aria-live="polite" style={{ fontFamily: theme.font.mono, color: at ? theme.color.ink : theme.color.muted, minHeight: frame.width < 520 ? 32 : 16 }} testID={testID ? `${testID}-readout` : undefined}>
        {picked != null && points[picked] ? describe(picked) : hint}
      </Txt>
    </View>
  );
}
