// Audit-log entries in words for the owners' "what changed" list. Entries whose action this file
// does not know yet (other areas add their own) still show, by their action name.

export type ChangeDetail = Record<string, unknown>;

const ROLE_WORD: Record<string, string> = { owner: "owner", carer: "carer", mentor: "mentor" };
const role = (r: unknown) => ROLE_WORD[String(r)] ?? String(r);
const str = (v: unknown, fallback = "") => (typeof v === "string" && v.length > 0 ? v : fallback);

export function describeChange(action: string, detail: ChangeDetail): string {
  switch (action) {
    case "member.invite":
      return `invited ${str(detail.email, "someone")} as ${role(detail.role)}`;
    case "member.invite-revoke":
      return `withdrew the invitation to ${str(detail.email, "someone")}`;
    case "member.join":
      return `joined as ${role(detail.role)} (invitation to ${str(detail.email, "them")})`;
    case "member.role":
      return `changed ${str(detail.name, "a member")} from ${role(detail.from)} to ${role(detail.to)}`;
    case "member.remove":
      return `removed ${str(detail.name, "a member")} (${role(detail.role)})`;
    case "member.leave":
      return `left the site (was ${role(detail.role)})`;
    case "note.add":
      return `left a note on ${str(detail.on, "a spot")}`;
    case "note.resolve":
      return `resolved a note on ${str(detail.on, "a spot")}`;
    case "note.reopen":
      return `reopened a note on ${str(detail.on, "a spot")}`;
    case "water.add":
      return `logged a water check for ${str(detail.source, "a source")}`;
    case "water.delete":
      return `removed a water check for ${str(detail.source, "a source")}`;
    case "site.create":
      return `created the site`;
    case "site.update":
      return `changed the site details`;
    case "spot.create":
      return `added the spot ${str(detail.name, "")}`.trim();
    case "spot.update":
      return `changed the spot ${str(detail.name, "")}`.trim();
    case "spot.delete":
      return `deleted the spot ${str(detail.name, "")}`.trim();
    case "sensor.create":
      return `added the sensor ${str(detail.name, "")}`.trim();
    case "sensor.update":
      return `changed the sensor ${str(detail.name, "")}`.trim();
    case "sensor.delete":
      return `deleted the sensor ${str(detail.name, "")}`.trim();
    case "sensor.rotate-secret":
      return `issued a new secret for a sensor`;
    case "sensor.place":
      return `moved a sensor`;
    case "sensor.unplace":
      return `took a sensor out of its spot`;
    case "watch.add":
      return `${detail.automatic ? "placed a plant that added" : "added"} a ${watchWord(detail.kind)} watch on ${str(detail.spot, "a spot")}`;
    case "watch.update":
      return `changed the ${watchWord(detail.kind)} watch on ${str(detail.spot, "a spot")}${detail.automatic ? " (it follows the most tender plant)" : ""}`;
    case "watch.delete":
      return `removed the ${watchWord(detail.kind)} watch on ${str(detail.spot, "a spot")}`;
    case "watch.pause":
      return `paused the ${watchWord(detail.kind)} watch on ${str(detail.spot, "a spot")}`;
    case "watch.resume":
      return `resumed the ${watchWord(detail.kind)} watch on ${str(detail.spot, "a spot")}`;
    default:
      return action.replace(/[._-]/g, " ");
  }
}

const WATCH_WORD: Record<string, string> = {
  cold: "cold-snap",
  heat: "too-hot",
  dry: "dry-air",
  condensation: "condensation",
  silent: "silent-sensor",
  battery: "battery",
};
const watchWord = (k: unknown) => WATCH_WORD[String(k)] ?? "alert";

/** Member changes first-class: the owners' list can be narrowed to them. */
export const isMemberChange = (action: string) => action.startsWith("member.");
