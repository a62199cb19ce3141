// Parameter table, correlation matrix, goodness of fit and warnings of one fit.
import React from 'react';
import { StyleSheet, View } from 'react-native';
import type { CalibrationJson } from '@/shared/api/calibration';
import { colors, fonts, radius, space } from '../theme';
import { Card } from '../ui/Card';
import { Text } from '../ui/Text';
import { fmtSig, paramDisplay, relativeError, withError } from './format';

const ORDER = ['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset', 'cs_over_cr', 'tau_eff0_s', 'theta0_rad'];

function orderedNames(names: string[]): string[] {
  return [...names].sort((a, b) => (ORDER.indexOf(a) + 1 || 99) - (ORDER.indexOf(b) + 1 || 99));
}

export function ParamTable({ cal }: { cal: CalibrationJson }) {
  const names = orderedNames(Object.keys(cal.params));
  return (
    <Card title="Parameters" testID="param-table">
      {names.map((n) => {
        const p = cal.params[n];
        const d = paramDisplay(n, cal.bias_unit);
        const rel = p.vary === false ? null : relativeError(p.value, p.stderr);
        return (
          // Name line above the value line: the value ± error keeps a whole line on a phone.
          <View key={n} style={s.row} testID={`param-${n}`}>
            <View style={s.nameLine}>
              <Text style={{ fontFamily: fonts.sansMedium }}>{d.short}</Text>
              <Text variant="caption" style={{ flex: 1 }} numberOfLines={1}>
                {d.label}
              </Text>
              <Text variant="monoSmall" aria-label="relative error">
                {p.vary === false ? 'fixed' : rel === null ? '—' : `${rel < 0.01 ? rel.toExponential(0) : fmtSig(rel, 2)} %`}
              </Text>
            </View>
            <Text variant="mono" testID={`param-${n}-value`}>
              {withError(p.value, p.vary === false ? null : p.stderr, d.scale)}
              {d.unit ? ` ${d.unit}` : ''}
            </Text>
            {p.vary !== false && p.stderr === null ? <Text variant="caption">error not estimable</Text> : null}
          </View>
        );
      })}
      <Text variant="caption">Value ± one standard error; the right column is the relative error.</Text>
      {Object.keys(cal.fixed ?? {}).length ? (
        <Text variant="caption">
          Given: {Object.entries(cal.fixed).map(([k, v]) => `${k} = ${v === null ? '—' : fmtSig(v, 5)}`).join(' · ')}
        </Text>
      ) : null}
    </Card>
  );
}

/** Copper for positive, ink for negative correlation; the wash deepens with |ρ|. */
function cellColor(r: number): string {
  const a = Math.min(1, Math.abs(r));
  const [cr, cg, cb] = r >= 0 ? [180, 83, 42] : [27, 36, 48];
  return `rgba(${cr},${cg},${cb},${(0.08 + 0.6 * a).toFixed(2)})`;
}

export function CorrelationMatrix({ cal }: { cal: CalibrationJson }) {
  const m = cal.correlation;
  if (!m || m.names.length === 0) {
    return (
      <Card title="Correlation">
        <Text variant="small">The covariance could not be estimated for this fit, so there is no correlation matrix.</Text>
      </Card>
    );
  }
  const short = m.names.map((n) => paramDisplay(n, cal.bias_unit).short);
  return (
    <Card title="Correlation" testID="correlation-matrix">
      <View style={{ alignSelf: 'flex-start' }}>
        <View style={s.mRow}>
          <View style={s.mLabel} />
          {short.map((n) => (
            <Text key={n} variant="caption" style={s.mHead} numberOfLines={1}>
              {n}
            </Text>
          ))}
        </View>
        {m.matrix.map((row, i) => (
          <View key={m.names[i]} style={s.mRow}>
            <Text variant="caption" style={s.mLabel} numberOfLines={1}>
              {short[i]}
            </Text>
            {row.map((r, j) => (
              <View key={j} style={[s.mCell, { backgroundColor: i === j ? '#ECE8DE' : cellColor(r) }]}>
                <Text style={[s.mText, Math.abs(r) > 0.6 && i !== j ? { color: colors.accentInk } : null]}>{i === j ? '1' : r.toFixed(2)}</Text>
              </View>
            ))}
          </View>
        ))}
      </View>
      <Text variant="caption">|ρ| near 1 means the data cannot tell those two parameters apart well.</Text>
    </Card>
  );
}

export function GoodnessCard({ cal }: { cal: CalibrationJson }) {
  const items: [string, string, string][] = [
    ['χ²_red', fmtSig(cal.redchi, 4), 'redchi'],
    ['χ²', fmtSig(cal.chisqr, 4), 'chisqr'],
    ['AIC', fmtSig(cal.aic, 5), 'aic'],
    ['BIC', fmtSig(cal.bic, 5), 'bic'],
    ['n (points)', String(cal.ndata), 'ndata'],
    ['free parameters', String(cal.nvarys), 'nvarys'],
    ['outliers', String(cal.outliers.length), 'outliers'],
    ['loss', cal.loss, 'loss'],
  ];
  return (
    <Card title="Goodness of fit" testID="goodness">
      <View style={s.grid}>
        {items.map(([label, value, key]) => (
          <View key={key} style={s.gridItem} testID={`goodness-${key}`}>
            <Text variant="caption">{label}</Text>
            <Text variant="mono">{value}</Text>
          </View>
        ))}
      </View>
      <Text variant="small" style={{ color: cal.success ? colors.inkSoft : colors.danger }}>
        {cal.success ? 'Converged' : 'Did not converge'}: {cal.message}
      </Text>
    </Card>
  );
}

export function WarningsCard({ warnings }: { warnings: string[] }) {
  if (!warnings.length) return null;
  return (
    <Card title={`Warnings (${warnings.length})`} testID="fit-warnings" style={{ borderColor: colors.pendingWash }}>
      {warnings.map((w, i) => (
        <View key={i} style={{ flexDirection: 'row', gap: space.sm }}>
          <Text style={{ color: colors.pending }}>•</Text>
          <Text variant="small" style={{ flexShrink: 1 }}>
            {w}
          </Text>
        </View>
      ))}
    </Card>
  );
}

const s = StyleSheet.create({
  row: { gap: 2, paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: colors.rule },
  nameLine: { flexDirection: 'row', alignItems: 'baseline', gap: space.sm },
  mRow: { flexDirection: 'row', alignItems: 'center' },
  mLabel: { width: 46 },
  mHead: { width: 50, textAlign: 'center' },
  mCell: { width: 48, height: 30, margin: 1, borderRadius: radius.sm, alignItems: 'center', justifyContent: 'center' },
  mText: { fontFamily: fonts.mono, fontSize: 12, color: colors.ink },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  gridItem: { minWidth: 92, gap: 2 },
});
