// Saved transfer studies (the computed result is stored whole, as JSON).
import { desc, eq } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { corridors, modeTracks, people, transferStudies } from '../schema';

export type StudyRow = typeof transferStudies.$inferSelect;

export interface StudyWithNames {
  study: StudyRow;
  trackCode: string;
  corridorCode: string | null;
  createdByName: string | null;
}

export async function insertStudy(
  db: DbOrTx,
  params: { name: string; trackId: number; corridorId: number | null; from: Date; to: Date; result: Record<string, unknown>; createdBy: number | null },
): Promise<StudyRow> {
  const [row] = await db
    .insert(transferStudies)
    .values({
      name: params.name,
      trackId: params.trackId,
      corridorId: params.corridorId,
      periodFrom: params.from,
      periodTo: params.to,
      result: params.result,
      createdBy: params.createdBy,
    })
    .returning();
  return row;
}

function selectWithNames(db: DbOrTx) {
  return db
    .select({ study: transferStudies, trackCode: modeTracks.code, corridorCode: corridors.code, createdByName: people.displayName })
    .from(transferStudies)
    .innerJoin(modeTracks, eq(modeTracks.id, transferStudies.trackId))
    .leftJoin(corridors, eq(corridors.id, transferStudies.corridorId))
    .leftJoin(people, eq(people.id, transferStudies.createdBy));
}

export async function listStudies(db: DbOrTx, params: { limit?: number } = {}): Promise<StudyWithNames[]> {
  return selectWithNames(db)
    .orderBy(desc(transferStudies.createdAt), desc(transferStudies.id))
    .limit(params.limit ?? 200);
}

export async function getStudy(db: DbOrTx, params: { id: number }): Promise<StudyWithNames | undefined> {
  const [row] = await selectWithNames(db).where(eq(transferStudies.id, params.id));
  return row;
}
