import { getCollectionProps, getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, useFetcher } from "react-router";
import { useEffect } from "react";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { acknowledge, getPreferences, savePreferences, siteEvents, watchMarks } from "~/.server/alerts/pages";
import { readForm, refuseForm } from "~/.server/ids";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { useNow } from "~/components/use-now";
import { formatDuration, formatValue } from "~/domain/alerts/messages";
import { minuteToClock } from "~/domain/alerts/quiet";
import { FieldError, FormErrors } from "~/components/field";
import { alertEmailsSchema, siteAlertsSchema } from "~/forms/alert-emails";
import { ALERT_KINDS, KINDS, type AlertKind } from "~/domain/alerts/rules";
import { formatInZone, timeAgo } from "~/lib/date-words";
import { WatchMark } from "~/components/watch-state";
import type { Route } from "./+types/site.alerts";
import { SpotKindIcon } from "~/components/icons";

export const meta: Route.MetaFunction = () => [{ title: "Alerts · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [site, events, prefs, spotList] = await Promise.all([
    getSite(siteId),
    siteEvents(siteId, { limit: 50 }),
    getPreferences(user.id, siteId, role),
    listSpots(siteId),
  ]);
  const rules = await watchMarks(spotList.map((s) => s.id));
  const watches = spotList.map((s) => ({
    id: s.id,
    name: s.name,
    indoor: s.indoor,
    rules: rules.filter((r) => r.spotId === s.id),
  }));
  return {
    now: Date.now(),
    site,
    role,
    watches,
    unit: user.temperatureUnit,
    events,
    prefs: { ...prefs, quietFrom: minuteToClock(prefs.quietFrom), quietTo: minuteToClock(prefs.quietTo) },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const submission = parseWithZod(await readForm(request), { schema: siteAlertsSchema });
  if (submission.status !== "success") {
    if (submission.payload.intent !== "preferences") refuseForm(submission.error);
    return data({ intent: "preferences" as const, result: submission.reply() }, { status: 400 });
  }
  const form = submission.value;
  if (form.intent === "acknowledge") {
    const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
    await acknowledge(siteId, form.eventId, user.id);
    return { acknowledged: true };
  }
  // Every member chooses their own e-mails, mentors included.
  const { siteId, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  await savePreferences({
    userId: user.id,
    siteId,
    email: form.email,
    kinds: form.kinds,
    quietFrom: form.quietFrom,
    quietTo: form.quietTo,
  });
  return { savedPrefs: true };
}

export default function SiteAlerts({ loaderData, actionData }: Route.ComponentProps) {
  const { site, role, unit, events, prefs } = loaderData;
  const now = useNow(loaderData.now);
  const live = useFetcher<typeof loader>();
  const { load } = live;
  // The list refreshes itself like the banner, so a new event shows up without a reload.
  useEffect(() => {
    const t = setInterval(() => {
      if (document.visibilityState === "visible") load(`/sites/${site.id}/alerts`);
    }, 15_000);
    return () => clearInterval(t);
  }, [site.id, load]);
  const list = live.data?.events ?? events;
  const open = list.filter((e) => !e.endedAt);
  const recent = list.filter((e) => e.endedAt);
  const [prefsForm, prefsFields] = useForm({
    id: "alert-emails",
    lastResult: actionData && "result" in actionData ? actionData.result : undefined,
    defaultValue: {
      email: prefs.email ? "on" : undefined,
      kinds: prefs.kinds,
      quietFrom: prefs.quietFrom,
      quietTo: prefs.quietTo,
    },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: alertEmailsSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const worst = (k: AlertKind) => (KINDS[k].direction === "below" ? "lowest" : "highest");

  const row = (e: (typeof list)[number]) => (
    <li key={e.id} className="card space-y-1" aria-label={`${KINDS[e.kind].label} at ${e.spotName}`}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p className="font-semibold">
          {e.endedAt ? (
            "Over: "
          ) : (
            <span className="inline-flex items-center gap-1 text-poor">
              <WatchMark state="open" /> Now:{" "}
            </span>
          )}
          {KINDS[e.kind].label} at{" "}
          <Link className="link" to={`/sites/${site.id}/spots/${e.spotId}`}>
            {e.spotName}
          </Link>
        </p>
        <p className="text-sm text-muted">
          since {formatInZone(e.startedAt, site.timeZone)}
          {e.endedAt
            ? ` · ended ${formatInZone(e.endedAt, site.timeZone)} · lasted ` +
              `${formatDuration((new Date(e.endedAt).getTime() - new Date(e.startedAt).getTime()) / 60_000)}`
            : ` · ${timeAgo(e.startedAt, now)}`}
        </p>
      </div>
      <p className="text-sm">
        {e.kind === "silent"
          ? `No readings for ${e.peak != null ? formatDuration(e.peak) : "a while"}.`
          : `Line: ${formatValue(e.kind, e.threshold, unit)}; ${worst(e.kind)} ${e.peak != null ? formatValue(e.kind, e.peak, unit) : "–"}.`}{" "}
        {e.notifiedAt ? "E-mailed." : "Not e-mailed yet."}
      </p>
      {e.acknowledgedAt ? (
        <p className="inline-flex items-center gap-1.5 text-sm text-ink">
          <WatchMark state="acknowledged" /> Acknowledged by {e.acknowledgedBy ?? "a former member"} ·{" "}
          {formatInZone(e.acknowledgedAt, site.timeZone)}
        </p>
      ) : e.endedAt ? null : role !== "mentor" ? (
        <Form method="post">
          <input type="hidden" name="eventId" value={e.id} />
          <button className="btn-quiet" name="intent" value="acknowledge">
            I'm on it — acknowledge
          </button>
        </Form>
      ) : (
        <p className="text-sm text-muted">Not acknowledged yet.</p>
      )}
    </li>
  );

  return (
    <div className="space-y-8">
      <section className="space-y-3">
        <h2 className="text-xl font-semibold">Open alerts</h2>
        {open.length === 0 ? (
          <p className="text-muted">
            Nothing open. Watches are set per spot, on each spot's page under “Alert watches”.
          </p>
        ) : (
          <ul className="space-y-3">{open.map(row)}</ul>
        )}
      </section>
      <section className="space-y-3">
        <h2 className="h2">Recent</h2>
        {recent.length === 0 ? (
          <p className="text-muted">No alerts have ended yet.</p>
        ) : (
          <ul className="space-y-3">{recent.map(row)}</ul>
        )}
      </section>

      <section className="space-y-3">
        <h2 className="h2">Watches per spot</h2>
        <ul className="card divide-y divide-line p-0">
          {loaderData.watches.map((w) => (
            <li key={w.id} className="flex flex-wrap items-baseline justify-between gap-2 px-4 py-2.5">
              <span className="inline-flex flex-wrap items-baseline gap-x-1">
                <SpotKindIcon name={w.name} indoor={w.indoor} size={16} className="self-center text-muted" />
                <Link className="link font-medium" to={`/sites/${site.id}/spots/${w.id}/alerts`}>
                  {w.name}
                </Link>{" "}
                <span className="text-sm text-muted">{w.indoor ? "indoors" : "outdoors"}</span>
              </span>
              <span className="text-sm text-muted">
                {w.rules.length === 0
                  ? "no watches"
                  : w.rules.map((r, i) => (
                      <span
                        key={`${r.kind}-${i}`}
                        className={`inline-flex items-center gap-1 ${i ? "ml-3" : ""} ${r.paused ? "text-care" : ""}`}
                      >
                        <WatchMark state={r.paused ? "paused" : "watching"} size={14} />
                        {KINDS[r.kind].label.toLowerCase()}
                        {r.paused ? " (paused)" : ""}
                      </span>
                    ))}
              </span>
            </li>
          ))}
        </ul>
      </section>

      <section className="card space-y-3">
        <h2 className="h2">Your e-mail alerts for {site.name}</h2>
        <Form method="post" className="space-y-3" {...getFormProps(prefsForm)}>
          <input type="hidden" name="intent" value="preferences" />
          <label className="inline-flex items-center gap-2">
            <input {...getInputProps(prefsFields.email, { type: "checkbox" })} /> Send me alerts by e-mail
          </label>
          <fieldset>
            <legend className="label">Which kinds</legend>
            {role === "mentor" ? (
              <p className="hint mb-2" data-testid="mentor-cold-opt-in">
                As a mentor you get cold-snap and silent-sensor e-mails only if you tick them here: the owner and carers
                are the ones who act on a cold night.
              </p>
            ) : null}
            <div className="flex flex-wrap gap-x-5 gap-y-2">
              {getCollectionProps(prefsFields.kinds, { type: "checkbox", options: [...ALERT_KINDS] }).map(
                ({ key, ...props }) => (
                  <label key={key} className="inline-flex items-center gap-2 text-sm">
                    <input {...props} /> {KINDS[props.value as AlertKind].label}
                  </label>
                ),
              )}
            </div>
            <FieldError meta={prefsFields.kinds} />
          </fieldset>
          <div className="flex flex-wrap items-end gap-3">
            <div>
              <label className="label" htmlFor={prefsFields.quietFrom.id}>
                Quiet hours from
              </label>
              <input
                className="field w-28"
                placeholder="22:30"
                {...getInputProps(prefsFields.quietFrom, { type: "text" })}
              />
            </div>
            <div>
              <label className="label" htmlFor={prefsFields.quietTo.id}>
                to
              </label>
              <input
                className="field w-28"
                placeholder="07:00"
                {...getInputProps(prefsFields.quietTo, { type: "text" })}
              />
            </div>
          </div>
          <FieldError meta={prefsFields.quietFrom} />
          <FieldError meta={prefsFields.quietTo} />
          <p className="hint">
            Times are the site's ({site.timeZone}). During quiet hours, heat, dry-air, condensation and battery alerts
            are not e-mailed (they still show here).{" "}
            <strong>Cold-snap and silent-sensor alerts are always sent, quiet hours or not</strong> — they are the ones
            that cannot wait until morning.
          </p>
          <FormErrors errors={prefsForm.errors} />
          <div className="flex items-center gap-3">
            <button className="btn">Save my alert e-mails</button>
            {actionData && "savedPrefs" in actionData ? <span className="text-sm text-good">Saved</span> : null}
          </div>
        </Form>
      </section>
    </div>
  );
}
