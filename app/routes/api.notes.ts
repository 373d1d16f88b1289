// Note actions for the NotesPanel on spot and plant pages: GET lists the notes of a spot or plant,
// POST adds (mentors and owners), resolves or reopens (owners).
import { data } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { cleanText, toId, readForm } from "~/.server/ids";
import { addNote, listNotes, NoteError, setNoteResolved, type NoteTarget } from "~/.server/notes";
import type { Route } from "./+types/api.notes";

// A spot by its id, or a plant by its key (at most 120 characters, no control characters).
function targetFrom(get: (k: string) => string | null): NoteTarget | null {
  const rawSpot = get("spotId");
  if (rawSpot) {
    const spotId = toId(rawSpot);
    return spotId === null ? null : { spotId };
  }
  const plantKey = get("plantKey")?.trim();
  if (plantKey && plantKey.length <= 120 && cleanText(plantKey) === plantKey) return { plantKey };
  return null;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const q = new URL(request.url).searchParams;
  const asked = q.has("spotId") || q.has("plantKey");
  const target = targetFrom((k) => q.get(k));
  if (asked && !target) throw data("Say which spot or plant, by its id or key.", { status: 400 });
  return Response.json({ notes: await listNotes(siteId, target ?? undefined) });
}

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const { siteId, user } = await requireSiteRole(
    request,
    params.siteId,
    intent === "resolve" || intent === "reopen" ? ["owner"] : ["owner", "mentor"],
  );
  try {
    if (intent === "add") {
      const target = targetFrom((k) => (form.get(k) as string | null) ?? null);
      if (!target) return data({ intent, error: "Say which spot or plant the note is on." }, { status: 400 });
      const body = String(form.get("body") ?? "");
      await addNote({ siteId, authorId: user.id, target, body }).catch((err) => {
        if (err instanceof NoteError) throw Object.assign(err, { body });
        throw err;
      });
      return { intent, ok: true };
    }
    if (intent === "resolve" || intent === "reopen") {
      const noteId = toId(form.get("noteId"));
      if (noteId === null)
        return data({ intent, error: "Choose a note; reload the page and try again.", body: "" }, { status: 400 });
      await setNoteResolved({ siteId, actorId: user.id, noteId, resolved: intent === "resolve" });
      return { intent, ok: true };
    }
  } catch (err) {
    if (err instanceof NoteError)
      return data(
        { intent, error: err.message, body: (err as NoteError & { body?: string }).body ?? "" },
        { status: 400 },
      );
    throw err;
  }
  return data({ intent, error: "Unknown action" }, { status: 400 });
}
