// Dated notes from a mentor or owner on a spot or a plant profile, shown with their author. Mentors
// and owners write; the owner resolves. Posts go to the notes resource route through a fetcher, so
// the page around it stays as it is and reloads its data afterwards.
import { useEffect, useRef } from "react";
import { useFetcher } from "react-router";
import type { Role } from "~/db/schema.server";
import { formatInZone } from "~/lib/date-words";
import { NoteIcon } from "~/components/icons";

export type PanelNote = {
  id: number;
  body: string;
  createdAt: Date | string;
  resolvedAt: Date | string | null;
  authorName: string;
};

type Target = { spotId: number } | { plantKey: string };

export function NotesPanel({
  siteId,
  target,
  notes,
  role,
  timeZone,
  about,
}: {
  siteId: number;
  target: Target;
  notes: PanelNote[];
  role: Role;
  timeZone: string;
  /** "this spot" or the plant's name, for the empty state and the form's label. */
  about: string;
}) {
  const add = useFetcher<{ ok?: boolean; error?: string; body?: string }>();
  const formRef = useRef<HTMLFormElement>(null);
  const canWrite = role === "owner" || role === "mentor";
  const action = `/api/sites/${siteId}/notes`;
  useEffect(() => {
    if (add.state === "idle" && add.data?.ok) formRef.current?.reset();
  }, [add.state, add.data]);
  const open = notes.filter((n) => !n.resolvedAt);
  const resolved = notes.filter((n) => n.resolvedAt);

  return (
    <section className="card space-y-4" data-testid="notes-panel" aria-labelledby="notes-heading">
      <div>
        <h3 id="notes-heading" className="h2 flex items-center gap-2">
          <NoteIcon size={20} />
          Notes from your mentor
        </h3>
        <p className="text-sm text-muted">Advice left on {about} by the site's mentor or owner, newest first.</p>
      </div>
      {notes.length === 0 ? <p className="text-sm text-muted">No notes on {about} yet.</p> : null}
      {open.length ? (
        <ul className="space-y-3">
          {open.map((n) => (
            <NoteItem key={n.id} note={n} action={action} canResolve={role === "owner"} timeZone={timeZone} />
          ))}
        </ul>
      ) : null}
      {resolved.length ? (
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Resolved ({resolved.length})</summary>
          <ul className="mt-3 space-y-3">
            {resolved.map((n) => (
              <NoteItem key={n.id} note={n} action={action} canResolve={role === "owner"} timeZone={timeZone} />
            ))}
          </ul>
        </details>
      ) : null}
      {canWrite ? (
        <add.Form method="post" action={action} className="space-y-2" ref={formRef}>
          <input type="hidden" name="intent" value="add" />
          {"spotId" in target ? (
            <input type="hidden" name="spotId" value={target.spotId} />
          ) : (
            <input type="hidden" name="plantKey" value={target.plantKey} />
          )}
          <label className="label" htmlFor="note-body">
            Leave a note on {about}
          </label>
          <textarea
            id="note-body"
            name="body"
            rows={3}
            maxLength={2000}
            required
            className="field"
            defaultValue={add.data?.error ? add.data.body : undefined}
            placeholder="e.g. Fine for Paphiopedilum, but the December nights are too cold for a Phalaenopsis."
          />
          {add.data?.error ? (
            <p className="error" role="alert">
              {add.data.error}
            </p>
          ) : null}
          <button className="btn" disabled={add.state !== "idle"}>
            Add note
          </button>
        </add.Form>
      ) : null}
    </section>
  );
}

function NoteItem({
  note,
  action,
  canResolve,
  timeZone,
}: {
  note: PanelNote;
  action: string;
  canResolve: boolean;
  timeZone: string;
}) {
  const f = useFetcher<{ error?: string }>();
  const resolved = note.resolvedAt != null;
  const day = (d: Date | string) => formatInZone(d, timeZone, { hour: undefined, minute: undefined });
  return (
    <li
      className={`rounded-t-[1rem] rounded-b-[0.2rem] border border-b-[3px] border-stone-line p-3 ${resolved ? "bg-paper text-muted" : "bg-white"}`}
    >
      <p className="text-sm whitespace-pre-line">{note.body}</p>
      <div className="mt-2 flex flex-wrap items-center justify-between gap-2 text-xs text-muted">
        <p>
          <span className="font-medium text-ink">{note.authorName}</span> ·{" "}
          <time dateTime={new Date(note.createdAt).toISOString()}>{day(note.createdAt)}</time>
          {resolved ? ` · ✓ resolved ${day(note.resolvedAt!)}` : ""}
        </p>
        {canResolve ? (
          <f.Form method="post" action={action}>
            <input type="hidden" name="intent" value={resolved ? "reopen" : "resolve"} />
            <input type="hidden" name="noteId" value={note.id} />
            <button className="btn-quiet px-2.5 py-1 text-xs" disabled={f.state !== "idle"}>
              {resolved ? "Reopen" : "Mark resolved"}
            </button>
          </f.Form>
        ) : null}
      </div>
      {f.data?.error ? <p className="error">{f.data.error}</p> : null}
    </li>
  );
}
