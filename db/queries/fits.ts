// Ring-down fits: one row per method of a fit analysis, with the (thinned) reconstruction as JSON
// and the modes as mode estimates (fit_id set) with their shapes.
import { asc, eq, inArray } from 'drizzle-orm';
import type { Db, DbOrTx } from '../client';
import { fits, modeEstimates } from '../schema';
import { insertEstimates, type EstimateInput } from './scans';

export type FitRow = typeof fits.$inferSelect;
export type FitEstimateRow = typeof modeEstimates.$inferSelect;

/** What `fits.reconstruction` holds (the API's reconstruction plus each mode's per-channel residues). */
export interface StoredReconstruction {
  startTime: string;
  stepSeconds: number;
  points: number;
  fullPoints: number;
  analysisRate: number;
  series: { channel: string; input: number[]; total: number[]; residual: number[]; perMode: number[][] }[];
  /** Same order as the method's estimates (by energy share). */
  residues: { channel: string; amplitude: number; phaseDeg: number }[][];
  energyShares: number[];
}

export interface FitMethodInput {
  method: string;
  order: number | null;
  snrDb: number | null;
  reconstruction: StoredReconstruction;
  estimates: EstimateInput[];
}

/**
 * Replaces the fits of an analysis (a retried job rewrites them whole) in one transaction.
 * Returns the new fit ids in method order.
 */
export async function replaceFits(db: Db, params: { analysisId: number; from: Date; to: Date; methods: FitMethodInput[] }): Promise<number[]> {
  return db.transaction(async (tx) => {
    await tx.delete(fits).where(eq(fits.analysisId, params.analysisId));
    const ids: number[] = [];
    for (const m of params.methods) {
      const [f] = await tx
        .insert(fits)
        .values({
          analysisId: params.analysisId,
          fromTime: params.from,
          toTime: params.to,
          method: m.method,
          modelOrder: m.order,
          snrDb: m.snrDb,
          reconstruction: m.reconstruction as unknown as Record<string, unknown>,
        })
        .returning({ id: fits.id });
      ids.push(f.id);
      await insertEstimates(tx, { source: { fitId: f.id }, estimates: m.estimates });
    }
    return ids;
  });
}

export interface FitWithModes {
  fit: FitRow;
  estimates: FitEstimateRow[];
}

/** The fits of an analysis (Prony first) with their estimates in stored order. */
export async function fitsOfAnalysis(db: DbOrTx, params: { analysisId: number }): Promise<FitWithModes[]> {
  const rows = await db.select().from(fits).where(eq(fits.analysisId, params.analysisId)).orderBy(asc(fits.id));
  if (rows.length === 0) return [];
  const est = await db
    .select()
    .from(modeEstimates)
    .where(inArray(modeEstimates.fitId, rows.map((r) => r.id)))
    .orderBy(asc(modeEstimates.id));
  const order = (m: string) => (m === 'prony' ? 0 : 1);
  return rows
    .map((fit) => ({ fit, estimates: est.filter((e) => e.fitId === fit.id) }))
    .sort((a, b) => order(a.fit.method) - order(b.fit.method));
}
