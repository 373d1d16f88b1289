// Mentor notes on a spot or a plant profile: written with their author, resolved by the owner, audited.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import { addNote, listNotes, NoteError, setNoteResolved } from "~/.server/notes";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { auditLog } from "~/db/schema.server";
import { addMember, makeSite, makeSpot, makeUser } from "./helpers";

describe("notes", () => {
  it("are listed with their author, open first, and resolving is recorded", async () => {
    const owner = await makeUser();
    const mentor = await makeUser();
    const site = await makeSite(owner);
    await addMember(site, mentor, "mentor");
    const spot = await makeSpot(site, { name: "North sill" });
    const first = await addNote({
      siteId: site.id,
      authorId: mentor.id,
      target: { spotId: spot.id },
      body: "  Too cold in January for a Phalaenopsis. ",
    });
    await addNote({
      siteId: site.id,
      authorId: mentor.id,
      target: { spotId: spot.id },
      body: "Good for a Paphiopedilum.",
    });
    await setNoteResolved({ siteId: site.id, actorId: owner.id, noteId: first.id, resolved: true });
    const list = await listNotes(site.id, { spotId: spot.id });
    expect(list.map((n) => n.body)).toEqual(["Good for a Paphiopedilum.", "Too cold in January for a Phalaenopsis."]);
    expect(list[1].resolvedAt).not.toBeNull();
    expect(list[0].authorName).toBe("Test grower");
    await expect(
      setNoteResolved({ siteId: site.id, actorId: owner.id, noteId: first.id, resolved: true }),
    ).rejects.toBeInstanceOf(NoteError);
    const log = await db().select().from(auditLog).where(eq(auditLog.siteId, site.id));
    expect(log.map((l) => l.action)).toEqual(["note.add", "note.add", "note.resolve"]);
    expect(log[0].detail).toMatchObject({ on: "North sill" });
  });

  it("go on library plants, not on unknown ones or another site's spot", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const other = await makeSite(await makeUser());
    const foreign = await makeSpot(other);
    const key = PLANT_LIBRARY[0].key;
    await addNote({
      siteId: site.id,
      authorId: owner.id,
      target: { plantKey: key },
      body: "Keep it off the radiator shelf.",
    });
    expect(await listNotes(site.id, { plantKey: key })).toHaveLength(1);
    await expect(
      addNote({ siteId: site.id, authorId: owner.id, target: { plantKey: "no-such-plant" }, body: "x" }),
    ).rejects.toBeInstanceOf(NoteError);
    await expect(
      addNote({ siteId: site.id, authorId: owner.id, target: { spotId: foreign.id }, body: "x" }),
    ).rejects.toThrow();
    await expect(
      addNote({ siteId: site.id, authorId: owner.id, target: { plantKey: key }, body: "   " }),
    ).rejects.toThrow(/Write the note/);
  });
});
