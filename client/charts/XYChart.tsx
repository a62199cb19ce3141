/**
 * victory-native Cartesian chart for the calibration screens. Loaded only through LazyChart
 * (Skia's web loader), never imported by a route: victory-native needs CanvasKit at import time.
 */
import React, { useMemo } from 'react';
import { View } from 'react-native';
import { useFont } from '@shopify/react-native-skia';
import { CartesianChart, Line, Scatter } from 'victory-native';
import { colors } from '../theme';
import { decimalsForStep, extent, pow10Label, type XYChartProps } from './series';

// The app's mono face for tick labels: victory-native draws text with Skia, which needs the ttf itself.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const PLEX_MONO = require('@expo-google-fonts/ibm-plex-mono/400Regular/IBMPlexMono_400Regular.ttf');

type Row = Record<string, number | null>;

const TICKS = 5;

export default function XYChart({ series, height, xDecimals, yDecimals, yTickFormat = 'plain', yDomain, testID }: XYChartProps) {
  const font = useFont(PLEX_MONO, 11);

  // One row per distinct x; each series fills its own column, the others stay null (gaps).
  const { rows, keys, xd, yd, yTicks } = useMemo(() => {
    const byX = new Map<number, Row>();
    const ys: number[] = [];
    const xs: number[] = [];
    for (const s of series) {
      for (const p of s.points) {
        if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) continue;
        let r = byX.get(p.x);
        if (!r) {
          r = { x: p.x };
          byX.set(p.x, r);
        }
        r[s.key] = p.y;
        xs.push(p.x);
        ys.push(p.y);
      }
    }
    const keys = series.map((s) => s.key);
    const rows = [...byX.values()].map((r) => {
      const full: Row = { ...r };
      for (const k of keys) if (!(k in full)) full[k] = null;
      return full;
    });
    const xe = extent(xs);
    const ye = yDomain ?? extent(ys);
    // Log-scaled values (pow10 labels): ticks on the 1-2-5 sequence instead of evenly in log10,
    // from the tick just below the data to the one just above (victory takes its domain from them).
    let yTicks: number[] | undefined;
    if (yTickFormat === 'pow10' && ye) {
      const seq: number[] = [];
      for (let e = Math.floor(ye[0]) - 1; e <= Math.ceil(ye[1]) + 1; e++) for (const m of [1, 2, 5]) seq.push(e + Math.log10(m));
      const lo = seq.filter((v) => v <= ye[0]).pop();
      const hi = seq.find((v) => v >= ye[1]);
      if (lo !== undefined && hi !== undefined) yTicks = seq.filter((v) => v >= lo - 1e-9 && v <= hi + 1e-9);
    }
    return {
      rows,
      keys,
      yTicks,
      xd: xDecimals ?? (xe ? decimalsForStep((xe[1] - xe[0]) / TICKS) : 2),
      yd: yDecimals ?? (ye ? decimalsForStep((ye[1] - ye[0]) / TICKS) : 2),
    };
  }, [series, xDecimals, yDecimals, yDomain, yTickFormat]);

  if (rows.length === 0) return <View style={{ height }} testID={testID} />;

  return (
    <View style={{ height, width: '100%' }} testID={testID}>
      <CartesianChart
        data={rows as Record<string, number>[]}
        xKey="x"
        yKeys={keys}
        padding={{ left: 4, right: 12, top: 8, bottom: 4 }}
        domainPadding={{ left: 8, right: 8, top: 12, bottom: 12 }}
        domain={yDomain ? { y: yDomain } : undefined}
        frame={{ lineColor: colors.rule, lineWidth: 1 }}
        xAxis={{
          font,
          tickCount: TICKS,
          labelColor: colors.inkSoft,
          lineColor: colors.rule,
          formatXLabel: (v: number) => (typeof v === 'number' ? v.toFixed(xd) : String(v)),
        }}
        yAxis={[
          {
            font,
            tickCount: TICKS,
            tickValues: yTicks,
            labelColor: colors.inkSoft,
            lineColor: colors.rule,
            formatYLabel: (v: number) => (typeof v !== 'number' ? String(v) : yTickFormat === 'pow10' ? pow10Label(v) : v.toFixed(yd)),
          },
        ]}
      >
        {({ points }) => (
          <>
            {series.map((s) =>
              s.kind === 'line' ? (
                <Line key={s.key} points={points[s.key]} color={s.color} strokeWidth={s.size ?? 2} connectMissingData curveType="linear" />
              ) : (
                <Scatter
                  key={s.key}
                  points={points[s.key]}
                  radius={s.size ?? 3.5}
                  color={s.color}
                  style={s.hollow ? 'stroke' : 'fill'}
                  strokeWidth={s.hollow ? 1.5 : undefined}
                />
              ),
            )}
          </>
        )}
      </CartesianChart>
    </View>
  );
}
