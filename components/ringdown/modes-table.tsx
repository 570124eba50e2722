import { StyleSheet, View } from 'react-native';
import type { FitMethodResult, FitMode } from '@/shared/api/fits';
import { BandChip } from '../band-chip';
import { formatHz, formatPercent } from '../format';
import { fixed, formatDb, formatDegrees, formatShare, formatWithUnit } from '../recordings/units';
import { Num, Text } from '../text';
import { colors, radii, space } from '../theme';
import { pairModes, TOLERANCE_RULE, type ModePair } from './compare';

export const METHOD_TITLE: Record<FitMethodResult['method'], string> = { prony: 'Prony', 'matrix-pencil': 'Matrix pencil' };

export interface ModesTableProps {
  a: FitMethodResult;
  b: FitMethodResult;
  channel: string;
  unit: string;
  trackName: (code: string | null) => string | null;
  mode: 'table' | 'cards';
}

function methodHead(m: FitMethodResult): string {
  return `${METHOD_TITLE[m.method]} · order ${m.order ?? '—'} · SNR ${formatDb(m.snrDb)}`;
}

function Verdict({ p, a, b }: { p: ModePair; a: FitMethodResult; b: FitMethodResult }) {
  if (p.verdict === 'only-a' || p.verdict === 'only-b') {
    const who = METHOD_TITLE[(p.verdict === 'only-a' ? a : b).method];
    return (
      <View style={[styles.verdict, styles.verdictOnly]} testID="verdict-only">
        <Text variant="caption" bold>{`only ${who}`}</Text>
      </View>
    );
  }
  if (p.verdict === 'differ') {
    const parts: string[] = [];
    if (Math.abs(p.dDamping!) > p.tolDamping!) parts.push(`Δζ ${fixed(p.dDamping!, 1)} points > ${fixed(p.tolDamping!, 1)}`);
    if (Math.abs(p.dFrequency!) > p.tolFrequency!) parts.push(`Δf ${fixed(p.dFrequency!, 3)} Hz > ${fixed(p.tolFrequency!, 3)}`);
    return (
      <View style={[styles.verdict, styles.verdictDiffer]} testID="verdict-differ" aria-label={`The methods disagree: ${parts.join(', ')}`}>
        <Text variant="caption" bold>
          ≠ differ
        </Text>
        <Num variant="caption">{parts.join(' · ')}</Num>
      </View>
    );
  }
  return (
    <View style={styles.verdict} testID="verdict-agree" aria-label={`The methods agree within tolerance: Δζ ${fixed(p.dDamping!, 1)} points, Δf ${fixed(p.dFrequency!, 3)} Hz`}>
      <Text variant="caption" color={colors.inkMuted}>
        = agree
      </Text>
    </View>
  );
}

function cellsOf(m: FitMode | null, channel: string, unit: string) {
  if (!m) return null;
  const part = m.channels.find((c) => c.channel === channel);
  return {
    f: formatHz(m.frequencyHz),
    z: formatPercent(m.dampingPercent),
    amp: part ? formatWithUnit(part.amplitude, unit) : '—',
    ph: part ? formatDegrees(part.phaseDeg) : '—',
    e: formatShare(m.energyShare),
    band: m.band,
  };
}

const COLS = [
  { key: 'f', title: 'Frequency', flex: 1.05 },
  { key: 'z', title: 'Damping', flex: 1.25 },
  { key: 'amp', title: 'Amplitude', flex: 1 },
  { key: 'ph', title: 'Phase', flex: 0.65 },
  { key: 'e', title: 'Energy', flex: 0.7 },
] as const;

/**
 * Prony and the matrix pencil side by side, one row per physical mode: frequency, damping and
 * band, amplitude and phase on the chosen channel, energy share; each method's order and SNR in
 * its heading; a mark where the two disagree beyond their tolerance (compare.ts).
 */
export function ModesTable({ a, b, channel, unit, trackName, mode }: ModesTableProps) {
  const pairs = pairModes(a, b);
  const differ = pairs.filter((p) => p.verdict === 'differ').length;
  const note = (
    <Text variant="caption" muted style={styles.note}>
      {`Amplitude and phase on ${channel}, at the interval start. ${TOLERANCE_RULE}`}
    </Text>
  );
  const summary = (
    <Text variant="small" style={styles.summary} testID="modes-summary">
      {differ === 0
        ? `The two methods agree on every mode they share (${pairs.filter((p) => p.verdict === 'agree').length}).`
        : `The two methods disagree on ${differ} ${differ === 1 ? 'mode' : 'modes'}: check the interval and the order before using ${differ === 1 ? 'it' : 'them'}.`}
    </Text>
  );

  if (mode === 'cards') {
    return (
      <View testID="modes-table">
        {summary}
        <View role="list" aria-label="Modes of both methods" style={styles.cards}>
          {pairs.map((p, i) => {
            const ma = p.a !== null ? a.modes[p.a] : null;
            const mb = p.b !== null ? b.modes[p.b] : null;
            return (
              <View key={i} role="listitem" style={[styles.card, p.verdict === 'differ' && styles.cardDiffer]}>
                <View style={styles.cardHead}>
                  <Text bold>{trackName(p.trackCode) ?? 'Mode outside the tracks'}</Text>
                  <Verdict p={p} a={a} b={b} />
                </View>
                {[
                  { m: ma, method: a },
                  { m: mb, method: b },
                ].map(({ m, method }) => {
                  const c = cellsOf(m, channel, unit);
                  return (
                    <View key={method.method} style={styles.cardMethod}>
                      <Text variant="caption" bold muted>
                        {METHOD_TITLE[method.method]}
                      </Text>
                      {c ? (
                        <>
                          <View style={styles.cardLine}>
                            <Num variant="small">{`${c.f} · ${c.z}`}</Num>
                            <BandChip band={c.band} size="small" detail={c.z} />
                          </View>
                          <Num variant="caption" muted>{`amplitude ${c.amp} · phase ${c.ph} · energy ${c.e}`}</Num>
                        </>
                      ) : (
                        <Text variant="caption" muted>
                          not found
                        </Text>
                      )}
                    </View>
                  );
                })}
              </View>
            );
          })}
        </View>
        <Text variant="caption" muted style={styles.note}>
          {`${methodHead(a)}. ${methodHead(b)}.`}
        </Text>
        {note}
      </View>
    );
  }

  return (
    <View testID="modes-table">
      {summary}
      <View role="table" aria-label="Modes of both methods" style={styles.table}>
        <View role="row" style={[styles.row, styles.groupRow]}>
          <View style={[styles.cell, { flex: 1.3 }]} role="columnheader">
            <Text variant="caption" bold muted>
              MODE
            </Text>
          </View>
          {[a, b].map((m) => (
            <View key={m.method} role="columnheader" style={[styles.cell, styles.groupHead, { flex: COLS.reduce((s, c) => s + c.flex, 0) }]}>
              <Text variant="small" bold>
                {METHOD_TITLE[m.method]}
              </Text>
              <Num variant="caption" muted>{`order ${m.order ?? '—'} · SNR ${formatDb(m.snrDb)}`}</Num>
            </View>
          ))}
          <View style={[styles.cell, { flex: 1.5 }]} role="columnheader">
            <Text variant="caption" bold muted>
              AGREEMENT
            </Text>
          </View>
        </View>
        <View role="row" style={[styles.row, styles.headRow]}>
          <View style={[styles.cell, { flex: 1.3 }]} />
          {[a, b].map((m) =>
            COLS.map((c, ci) => (
              <View key={`${m.method}-${c.key}`} role="columnheader" style={[styles.cell, { flex: c.flex }, ci === 0 && styles.groupStart]}>
                <Text variant="caption" bold muted>
                  {c.title}
                </Text>
              </View>
            )),
          )}
          <View style={[styles.cell, { flex: 1.5 }]} />
        </View>
        {pairs.map((p, i) => {
          const ca = cellsOf(p.a !== null ? a.modes[p.a] : null, channel, unit);
          const cb = cellsOf(p.b !== null ? b.modes[p.b] : null, channel, unit);
          return (
            <View key={i} role="row" style={[styles.row, i % 2 === 1 && styles.zebra, p.verdict === 'differ' && styles.rowDiffer]} testID={`mode-row-${i}`}>
              <View role="cell" style={[styles.cell, { flex: 1.3 }]}>
                <Text variant="small" bold>
                  {trackName(p.trackCode) ?? 'outside the tracks'}
                </Text>
              </View>
              {[ca, cb].map((c, mi) =>
                COLS.map((col, ci) => (
                  <View key={`${mi}-${col.key}`} role="cell" style={[styles.cell, { flex: col.flex }, ci === 0 && styles.groupStart]}>
                    {!c ? (
                      ci === 0 ? (
                        <Text variant="caption" muted>
                          not found
                        </Text>
                      ) : null
                    ) : col.key === 'z' ? (
                      <View style={styles.dampingCell}>
                        <Num variant="small">{c.z}</Num>
                        <BandChip band={c.band} size="small" detail={c.z} />
                      </View>
                    ) : (
                      <Num variant="small">{c[col.key]}</Num>
                    )}
                  </View>
                )),
              )}
              <View role="cell" style={[styles.cell, { flex: 1.5 }]}>
                <Verdict p={p} a={a} b={b} />
              </View>
            </View>
          );
        })}
      </View>
      {note}
    </View>
  );
}

const styles = StyleSheet.create({
  summary: { marginBottom: space.sm },
  note: { marginTop: space.sm },
  table: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, overflow: 'hidden', backgroundColor: '#FFFFFF' },
  row: { flexDirection: 'row', alignItems: 'center', borderTopWidth: 1, borderTopColor: colors.rule, minHeight: 44 },
  groupRow: { borderTopWidth: 0, backgroundColor: colors.paper, alignItems: 'flex-end' },
  headRow: { backgroundColor: colors.paper, minHeight: 30 },
  groupHead: { borderLeftWidth: 1, borderLeftColor: colors.rule },
  groupStart: { borderLeftWidth: 1, borderLeftColor: colors.rule, alignSelf: 'stretch', justifyContent: 'center' },
  zebra: { backgroundColor: '#F8F6F2' },
  rowDiffer: { backgroundColor: '#FFF8E8' },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.xs, minWidth: 0 },
  dampingCell: { gap: 2 },
  verdict: { alignSelf: 'flex-start', gap: 1 },
  verdictDiffer: { borderWidth: 1.5, borderColor: colors.ink, borderStyle: 'dashed', borderRadius: radii.sm, paddingHorizontal: space.xs, paddingVertical: 2, backgroundColor: '#FFFFFF' },
  verdictOnly: { borderWidth: 1, borderColor: colors.ruleStrong, borderRadius: radii.sm, paddingHorizontal: space.xs, paddingVertical: 1 },
  cards: { gap: space.sm },
  card: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, padding: space.md, backgroundColor: '#FFFFFF', gap: space.sm },
  cardDiffer: { borderColor: colors.ink, borderStyle: 'dashed', borderWidth: 1.5 },
  cardHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  cardMethod: { gap: 2 },
  cardLine: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: space.sm },
});
