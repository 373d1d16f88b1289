// Mentor notes on a spot or a plant profile. Mentors and owners write them; the owner resolves
// them. Every change goes to audit_log.
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { db } from "~/.server/db";
import { cleanText } from "~/.server/ids";
import { getSpot } from "~/.server/spots";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { auditLog, customPlants, notes, users } from "~/db/schema.server";

export const NOTE_MAX = 2000;

export type NoteTarget = { spotId: number } | { plantKey: string };

export class NoteError extends Error {}

/** The notes on one spot or plant, or all of the site's when no target is given. */
export async function listNotes(siteId: number, target?: NoteTarget) {
  // A key PostgreSQL could not even compare (a NUL in a URL) names no plant.
  if (target && "plantKey" in target && cleanText(target.plantKey) !== target.plantKey) return [];
  const where = !target
    ? eq(notes.siteId, siteId)
    : "spotId" in target
      ? and(eq(notes.siteId, siteId), eq(notes.spotId, target.spotId))
      : and(eq(notes.siteId, siteId), eq(notes.plantKey, target.plantKey));
  const rows = await db()
    .select({
      id: notes.id,
      spotId: notes.spotId,
      plantKey: notes.plantKey,
      body: notes.body,
      createdAt: notes.createdAt,
      resolvedAt: notes.resolvedAt,
      authorName: users.name,
    })
    .from(notes)
    .leftJoin(users, eq(users.id, notes.authorId))
    .where(where)
    // Open notes first, then newest first.
    .orderBy(sql`${notes.resolvedAt} is not null`, desc(notes.createdAt))
    .limit(100);
  return rows.map((r) => ({ ...r, authorName: r.authorName ?? "A former member" }));
}

/** What the note is on, in words, checked to belong to the site. */
async function targetLabel(siteId: number, target: NoteTarget) {
  if ("spotId" in target) return (await getSpot(siteId, target.spotId)).name;
  const shipped = PLANT_LIBRARY.find((p) => p.key === target.plantKey);
  if (shipped) return shipped.name;
  const [custom] = await db()
    .select({ profile: customPlants.profile })
    .from(customPlants)
    .where(and(eq(customPlants.siteId, siteId), eq(customPlants.key, target.plantKey)));
  if (!custom) throw new NoteError("That plant is not in the library or this site's own plants.");
  return String((custom.profile as { name?: string }).name ?? target.plantKey);
}

export async function addNote(opts: { siteId: number; authorId: number; target: NoteTarget; body: string }) {
  // PostgreSQL refuses NUL in text; it and the other control characters nobody types are dropped.
  const body = cleanText(opts.body).trim();
  if (!body) throw new NoteError("Write the note first.");
  if (body.length > NOTE_MAX) throw new NoteError(`Keep a note under ${NOTE_MAX.toLocaleString("en")} characters.`);
  const on = await targetLabel(opts.siteId, opts.target);
  return db().transaction(async (tx) => {
    const [note] = await tx
      .insert(notes)
      .values({
        siteId: opts.siteId,
        authorId: opts.authorId,
        body,
        ...("spotId" in opts.target ? { spotId: opts.target.spotId } : { plantKey: opts.target.plantKey }),
      })
      .returning();
    await tx
      .insert(auditLog)
      .values({ siteId: opts.siteId, actorId: opts.authorId, action: "note.add", detail: { noteId: note.id, on } });
    return note;
  });
}

export async function setNoteResolved(opts: { siteId: number; actorId: number; noteId: number; resolved: boolean }) {
  await db().transaction(async (tx) => {
    const [note] = await tx
      .update(notes)
      .set({ resolvedAt: opts.resolved ? new Date() : null })
      .where(
        and(
          eq(notes.id, opts.noteId),
          eq(notes.siteId, opts.siteId),
          opts.resolved ? isNull(notes.resolvedAt) : sql`${notes.resolvedAt} is not null`,
        ),
      )
      .returning();
    if (!note) throw new NoteError(opts.resolved ? "That note is resolved already." : "That note is open already.");
    const on = note.spotId
      ? await targetLabel(opts.siteId, { spotId: note.spotId }).catch(() => "a spot")
      : (note.plantKey ?? "a plant");
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: opts.resolved ? "note.resolve" : "note.reopen",
      detail: { noteId: note.id, on },
    });
  });
}
