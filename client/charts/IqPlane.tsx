/**
 * Complex plane of one trace (Im S versus Re S) with the fitted response and resonance circle,
 * drawn with Skia's own Canvas/Path primitives: a parametric curve is not a function of x, so a
 * Cartesian chart (which sorts by x) cannot draw it. Loaded only through LazyChart.
 */
import React, { useMemo } from 'react';
import { Canvas, Circle, Group, Line as SkLine, Path, Skia, Text as SkText, useFont, vec } from '@shopify/react-native-skia';
import { colors } from '../theme';
import type { IqPlaneProps } from './series';

// eslint-disable-next-line @typescript-eslint/no-require-imports
const PLEX_MONO = require('@expo-google-fonts/ibm-plex-mono/400Regular/IBMPlexMono_400Regular.ttf');

export default function IqPlane({ size, data, model, circle, testID }: IqPlaneProps) {
  const font = useFont(PLEX_MONO, 10);
  const geo = useMemo(() => {
    let lo = Infinity;
    let hi = -Infinity;
    const take = (v: number) => {
      if (Number.isFinite(v)) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    };
    data.re.forEach(take);
    data.im.forEach(take);
    if (circle) [circle.xc - circle.r, circle.xc + circle.r, circle.yc - circle.r, circle.yc + circle.r].forEach(take);
    // Equal scales on both axes, so the resonance circle looks round; the origin is kept in view.
    take(0);
    const span = hi - lo || 1;
    const pad = 0.06 * span;
    const min = lo - pad;
    const max = hi + pad;
    const s = size / (max - min);
    const px = (x: number) => (x - min) * s;
    const py = (y: number) => size - (y - min) * s;
    const points = Skia.PathBuilder.Make();
    for (let i = 0; i < data.re.length; i++) points.addCircle(px(data.re[i]), py(data.im[i]), 2);
    let modelPath = null;
    if (model && model.re.length > 1) {
      const b = Skia.PathBuilder.Make();
      b.moveTo(px(model.re[0]), py(model.im[0]));
      for (let i = 1; i < model.re.length; i++) b.lineTo(px(model.re[i]), py(model.im[i]));
      modelPath = b.build();
    }
    return { px, py, s, pointsPath: points.build(), modelPath, min, max };
  }, [data, model, circle, size]);

  return (
    <Canvas style={{ width: size, height: size }} testID={testID}>
      <Group>
        <SkLine p1={vec(geo.px(0), 0)} p2={vec(geo.px(0), size)} color={colors.rule} strokeWidth={1} />
        <SkLine p1={vec(0, geo.py(0))} p2={vec(size, geo.py(0))} color={colors.rule} strokeWidth={1} />
        <Path path={geo.pointsPath} color={colors.inkSoft} style="fill" />
        {circle ? (
          <Circle cx={geo.px(circle.xc)} cy={geo.py(circle.yc)} r={circle.r * geo.s} color={colors.accent} style="stroke" strokeWidth={1} opacity={0.5} />
        ) : null}
        {geo.modelPath ? <Path path={geo.modelPath} color={colors.accent} style="stroke" strokeWidth={2} /> : null}
        {font ? <SkText x={geo.px(0) + 4} y={12} text="Im" font={font} color={colors.inkFaint} /> : null}
        {font ? <SkText x={size - 20} y={geo.py(0) - 4} text="Re" font={font} color={colors.inkFaint} /> : null}
      </Group>
    </Canvas>
  );
}
