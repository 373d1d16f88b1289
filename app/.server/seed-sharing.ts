// Demo data for sharing: the mentor's notes on two spots (one already resolved by the owner), a
// year of water checks for tap and rain water, and the history of how the carer and mentor joined,
// so the owners' "what changed" list has something to show.
import { eq } from "drizzle-orm";
import { db } from "~/.server/db";
import { auditLog, invitations, notes, spots, waterChecks } from "~/db/schema.server";

const DAY = 86_400_000;

/** A small deterministic wobble, so the demo reads like real meter readings and stays the same. */
const wobble = (i: number, amplitude: number) => Math.round(Math.sin(i * 2.3 + 0.7) * amplitude * 10) / 10;

export async function seedSharing(opts: {
  siteId: number;
  ownerId: number;
  carerId: number;
  mentorId: number;
  now?: Date;
}) {
  const now = opts.now ?? new Date();
  const siteSpots = await db()
    .select({ id: spots.id, name: spots.name })
    .from(spots)
    .where(eq(spots.siteId, opts.siteId));
  const spotNamed = (start: string) => siteSpots.find((s) => s.name.startsWith(start));
  const landing = spotNamed("Landing sill");
  const bathroom = spotNamed("Bathroom shelf");
  const ago = (days: number) => new Date(now.getTime() - days * DAY);

  // How the household came to share the site, written as the app writes it.
  await db()
    .insert(invitations)
    .values([
      {
        siteId: opts.siteId,
        email: "carer@nichewise.test",
        role: "carer",
        tokenHash: "demo-accepted-carer",
        invitedBy: opts.ownerId,
        expiresAt: ago(173),
        acceptedAt: ago(179),
        acceptedBy: opts.carerId,
        createdAt: ago(180),
      },
      {
        siteId: opts.siteId,
        email: "mentor@nichewise.test",
        role: "mentor",
        tokenHash: "demo-accepted-mentor",
        invitedBy: opts.ownerId,
        expiresAt: ago(143),
        acceptedAt: ago(148),
        acceptedBy: opts.mentorId,
        createdAt: ago(150),
      },
    ]);
  await db()
    .insert(auditLog)
    .values([
      {
        siteId: opts.siteId,
        actorId: opts.ownerId,
        action: "member.invite",
        detail: { email: "carer@nichewise.test", role: "carer" },
        at: ago(180),
      },
      {
        siteId: opts.siteId,
        actorId: opts.carerId,
        action: "member.join",
        detail: { email: "carer@nichewise.test", role: "carer" },
        at: ago(179),
      },
      {
        siteId: opts.siteId,
        actorId: opts.ownerId,
        action: "member.invite",
        detail: { email: "mentor@nichewise.test", role: "mentor" },
        at: ago(150),
      },
      {
        siteId: opts.siteId,
        actorId: opts.mentorId,
        action: "member.join",
        detail: { email: "mentor@nichewise.test", role: "mentor" },
        at: ago(148),
      },
    ]);

  const mentorNotes = [
    landing && {
      spotId: landing.id,
      body:
        "This sill is fine for a Paphiopedilum most of the year, but look at the December and January nights: " +
        "it drops under 13 °C on a lot of them, which is too cold for your Phalaenopsis. Move the Phal to the spare room for winter.",
      createdAt: ago(120),
    },
    landing && {
      spotId: landing.id,
      body: "Single glazing: on frosty nights pull the pots back from the glass, or slide a sheet of bubble wrap between them and the pane.",
      createdAt: ago(60),
      resolvedAt: ago(52),
    },
    bathroom && {
      spotId: bathroom.id,
      body:
        "Humidity here is lovely after showers but it sits near the dew point on cold mornings — water condensing on leaves overnight invites rot. " +
        "Open the window a crack after the morning shower, and water early in the day.",
      createdAt: ago(90),
    },
  ].filter(Boolean) as { spotId: number; body: string; createdAt: Date; resolvedAt?: Date }[];
  if (mentorNotes.length) {
    await db()
      .insert(notes)
      .values(mentorNotes.map((n) => ({ siteId: opts.siteId, authorId: opts.mentorId, ...n })));
    await db()
      .insert(auditLog)
      .values(
        mentorNotes.map((n) => ({
          siteId: opts.siteId,
          actorId: opts.mentorId,
          action: "note.add",
          detail: { on: siteSpots.find((s) => s.id === n.spotId)?.name ?? "a spot" },
          at: n.createdAt,
        })),
      );
  }
  // Tap water about 280 ppm, alkaline (hard-water area); rain from the water butt about 15 ppm.
  // The carer measures with a TDS pen on the 0.5 scale; a few early tap checks came from the owner's EC meter.
  const checks: (typeof waterChecks.$inferInsert)[] = [];
  for (let i = 0; i < 12; i++) {
    const checkedOn = ago(14 + i * 15);
    const byUserId = i % 3 === 0 ? opts.ownerId : opts.carerId;
    if (i >= 9) {
      checks.push({
        siteId: opts.siteId,
        source: "tap",
        checkedOn,
        ec: Math.round(560 + wobble(i, 20) * 2),
        ecScale: 0.5,
        ph: Math.round((7.6 + wobble(i + 3, 0.15)) * 10) / 10,
        byUserId,
      });
    } else {
      checks.push({
        siteId: opts.siteId,
        source: "tap",
        checkedOn,
        ppm: Math.round(280 + wobble(i, 12)),
        ecScale: 0.5,
        ph: Math.round((7.5 + wobble(i + 3, 0.2)) * 10) / 10,
        byUserId,
      });
    }
    checks.push({
      siteId: opts.siteId,
      source: "rain",
      checkedOn: new Date(checkedOn.getTime() + 3_600_000),
      ppm: Math.max(4, Math.round(15 + wobble(i + 7, 6))),
      ecScale: 0.5,
      ph: Math.round((6.1 + wobble(i + 5, 0.35)) * 10) / 10,
      byUserId,
    });
  }
  await db().insert(waterChecks).values(checks);
  await db()
    .insert(auditLog)
    .values(
      checks.map((c) => ({
        siteId: opts.siteId,
        actorId: c.byUserId ?? null,
        action: "water.add",
        detail: { source: c.source },
        at: c.checkedOn,
      })),
    );
  return { notes: mentorNotes.length, waterChecks: checks.length };
}
