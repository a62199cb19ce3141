/**
 * Mounts a Skia chart in the browser only: CanvasKit (public/canvaskit.wasm, 8 MB) is fetched on
 * the first chart screen, after the component has mounted, never during the static export.
 * The chart modules are imported lazily so victory-native never loads before CanvasKit does.
 */
import React, { useEffect, useState } from 'react';
import { ActivityIndicator, Platform, View } from 'react-native';
import { WithSkiaWeb } from '@shopify/react-native-skia/lib/module/web';
import { colors, radius } from '../theme';
import { Text } from '../ui/Text';
import type { IqPlaneProps, XYChartProps } from './series';

// Served from the site root (scripts/copy-canvaskit.sh puts it into public/ before the export).
const SKIA_OPTS = { locateFile: (file: string) => '/' + file };

function Placeholder({ height, label }: { height: number; label?: string }) {
  return (
    <View style={{ height, alignItems: 'center', justifyContent: 'center', gap: 6 }} role="status" aria-live="polite">
      <ActivityIndicator color={colors.accent} />
      <Text variant="caption">{label ?? 'Drawing the chart…'}</Text>
    </View>
  );
}

class ChartBoundary extends React.Component<{ height: number; children: React.ReactNode }, { error: Error | null }> {
  state = { error: null as Error | null };
  static getDerivedStateFromError(error: Error) {
    return { error };
  }
  render() {
    if (this.state.error) {
      return (
        <View
          style={{ height: this.props.height, alignItems: 'center', justifyContent: 'center', borderWidth: 1, borderColor: colors.dangerWash, borderRadius: radius.sm, padding: 12 }}
          role="alert"
          testID="chart-error"
        >
          <Text variant="small" style={{ color: colors.danger, textAlign: 'center' }}>
            The chart could not be drawn here ({this.state.error.message}). The numbers below are unaffected.
          </Text>
        </View>
      );
    }
    return this.props.children;
  }
}

function useMounted(): boolean {
  const [m, setM] = useState(false);
  useEffect(() => setM(true), []);
  return m;
}

type Loader<P> = () => Promise<{ default: React.ComponentType<P> }>;

function Lazy<P extends object>({ load, props, height }: { load: Loader<P>; props: P; height: number }) {
  const mounted = useMounted();
  if (!mounted) return <Placeholder height={height} />;
  if (Platform.OS !== 'web') {
    // Native builds link Skia directly; the web loader is not needed there.
    const NativeChart = React.lazy(load);
    return (
      <React.Suspense fallback={<Placeholder height={height} />}>
        <NativeChart {...props} />
      </React.Suspense>
    );
  }
  return (
    <ChartBoundary height={height}>
      <WithSkiaWeb getComponent={load} opts={SKIA_OPTS} fallback={<Placeholder height={height} />} componentProps={props} />
    </ChartBoundary>
  );
}

export function XYChartLazy(props: XYChartProps) {
  return <Lazy load={() => import('./XYChart')} props={props} height={props.height} />;
}

export function IqPlaneLazy(props: IqPlaneProps) {
  return <Lazy load={() => import('./IqPlane')} props={props} height={props.size} />;
}
