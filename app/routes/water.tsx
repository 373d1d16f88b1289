import { useMemo, useRef, useEffect } from "react";
import { getCollectionProps, getFormProps, getInputProps, getSelectProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { getSite } from "~/.server/sites";
import { readForm, refuseForm } from "~/.server/ids";
import { addWaterCheck, deleteWaterCheck, listWaterChecks } from "~/.server/water";
import { Chart, type ChartSpec } from "~/components/chart";
import { FieldError, FormErrors } from "~/components/field";
import { MEASURES, waterCheckSchema, waterSchema } from "~/forms/water";
import { parseSource, ppmLabel, sourceName, STANDARD_SOURCES } from "~/domain/water/logged-check";
import { PH_MAX, PH_MIN, ROUTINE_WATERING_MAX_EC, routineLimitPpm, UNBUFFERED_MAX_EC } from "~/domain/water/verdict";
import { formatInZone, toLocalInputValue, zonedToUtc } from "~/lib/time";
import type { Route } from "./+types/water";
import { WaterIcon } from "~/components/icons";
import { DropMark, WATER_SOURCE_COLOURS, WATER_VERDICT } from "~/components/water-marks";

export const meta: Route.MetaFunction = () => [{ title: "Water checks · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const site = await getSite(siteId);
  const checks = await listWaterChecks(siteId);
  return { role, timeZone: site.timeZone, today: toLocalInputValue(new Date(), site.timeZone).slice(0, 10), checks };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const submission = parseWithZod(await readForm(request), { schema: waterSchema });
  if (submission.status !== "success") {
    if (submission.payload.intent !== "log") refuseForm(submission.error);
    return data({ intent: "log" as const, result: submission.reply() }, { status: 400 });
  }
  const form = submission.value;
  if (form.intent === "delete") {
    await deleteWaterCheck(siteId, user.id, form.checkId);
    return { intent: form.intent, ok: true as const };
  }
  const site = await getSite(siteId);
  const [year, month, day] = form.checkedOn.split("-").map(Number);
  // Noon local time, so the date reads the same in every time zone of the site's members.
  const checkedOn = zonedToUtc({ year, month, day, hour: 12 }, site.timeZone);
  if (Number.isNaN(checkedOn.getTime()) || checkedOn.getTime() > Date.now() + 36 * 3_600_000) {
    return data(
      {
        intent: form.intent,
        result: submission.reply({ fieldErrors: { checkedOn: ["The date cannot be in the future."] } }),
      },
      { status: 400 },
    );
  }
  const source = parseSource(form.source, form.ownSource ?? "")!;
  const value = form.value ?? null;
  const scale = form.scale === "0.5" ? 0.5 : form.scale === "0.7" ? 0.7 : null;
  await addWaterCheck(siteId, user.id, {
    source,
    checkedOn,
    ppm: form.measure === "ppm" ? value : null,
    ec: form.measure === "ec" ? value : null,
    // The scale of a TDS meter turns its ppm into conductivity; an EC meter's is kept for its ppm.
    ecScale: value != null ? scale : null,
    ph: form.ph ?? null,
  });
  return { intent: form.intent, ok: true as const, source };
}

export default function Water({ loaderData, actionData }: Route.ComponentProps) {
  const { role, checks, timeZone, today } = loaderData;
  const canLog = role !== "mentor";
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const logged = actionData && "ok" in actionData && actionData.intent === "log";
  const [logForm, logFields] = useForm({
    id: "water-check",
    lastResult: actionData && "result" in actionData ? actionData.result : undefined,
    defaultValue: { source: "tap", checkedOn: today, measure: "ppm" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: waterCheckSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const formRef = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (logged) formRef.current?.reset();
  }, [actionData, logged]);

  const sources = useMemo(() => [...new Set(checks.map((c) => c.source))], [checks]);
  const latest = sources.map((s) => checks.filter((c) => c.source === s).at(-1)!);
  const ownSources = sources.filter((s) => !(STANDARD_SOURCES as readonly string[]).includes(s));
  const day = (d: Date | string) => formatInZone(d, timeZone, { hour: undefined, minute: undefined });

  const chartData = useMemo(() => {
    const withTds = checks.filter((c) => c.ecExact != null);
    const t = [...new Set(withTds.map((c) => Math.floor(new Date(c.checkedOn).getTime() / 1000)))].sort(
      (a, b) => a - b,
    );
    const cols: Record<string, (number | null)[]> = { t };
    sources.forEach((s, i) => {
      const col: (number | null)[] = t.map(() => null);
      for (const c of withTds.filter((c) => c.source === s))
        col[t.indexOf(Math.floor(new Date(c.checkedOn).getTime() / 1000))] = Math.round(c.ecExact!);
      cols[`s${i}`] = col;
    });
    cols.limit = t.map(() => ROUTINE_WATERING_MAX_EC);
    return t.length ? cols : undefined;
  }, [checks, sources]);
  const unplotted = checks.filter((c) => c.ecExact == null && c.ppm != null).length;
  const spec = useMemo<ChartSpec>(
    () => ({
      title: "Dissolved solids over time (conductivity, µS/cm)",
      unit: "C",
      height: 220,
      calendarAxis: true,
      build: (d) => ({
        data: [d.t, ...sources.map((_s, i) => d[`s${i}`]), d.limit] as never,
        series: [
          ...sources.map((s, i) => ({
            label: sourceName(s),
            stroke: WATER_SOURCE_COLOURS[i % WATER_SOURCE_COLOURS.length],
            width: 2,
            spanGaps: true,
            points: { show: true, size: 6 },
            value: (_u: unknown, v: number | null) => (v == null ? "–" : `${v} µS/cm`),
          })),
          {
            label: `${ROUTINE_WATERING_MAX_EC} µS/cm rule of thumb`,
            stroke: "#4a5767",
            dash: [6, 4],
            width: 1,
            points: { show: false },
          },
        ],
        axes: [
          { stroke: "#4a5767", grid: { stroke: "#d4dcdb" } },
          { stroke: "#4a5767", grid: { stroke: "#d4dcdb" }, label: "µS/cm", size: 50 },
        ],
      }),
    }),
    [sources],
  );

  return (
    <div className="space-y-6">
      <div>
        <h2 className="flex items-center gap-2 text-title font-semibold">
          <WaterIcon size={22} />
          Water checks
        </h2>
        <p className="max-w-3xl text-sm text-muted">
          Check each water source before it goes on the plants: dissolved solids (a TDS meter in ppm, or an EC meter in
          µS/cm) and pH. The rules of thumb:
        </p>
        <ul className="mt-1 max-w-3xl list-disc pl-5 text-sm text-muted" data-testid="water-rules">
          <li>
            Water that conducts over {ROUTINE_WATERING_MAX_EC} µS/cm is not for routine watering. A TDS meter shows that
            line as {routineLimitPpm(0.5)} ppm on the 0.5 (NaCl) scale and {routineLimitPpm(0.7)} ppm on the 0.7 (442)
            scale; its manual says which it uses.
          </li>
          <li>
            pH outside {PH_MIN}–{PH_MAX} needs attention only in water with some buffer (over {UNBUFFERED_MAX_EC}{" "}
            µS/cm). Rain and RO water are nearly free of minerals: their pH drifts with the air and means little, and
            the potting mix and fertiliser set the pH at the roots.
          </li>
        </ul>
      </div>

      <p className="caution text-sm" role="note">
        <span className="font-semibold">These are hobby rules of thumb</span> (common practice among orchid growers),
        not a laboratory test or a drinking-water standard. Cheap meters drift: calibrate yours as its manual says, and
        ask your mentor or club when a result surprises you.
      </p>

      {latest.length ? (
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" data-testid="water-sources">
          {latest.map((c) => {
            const v = WATER_VERDICT[c.verdict];
            return (
              <section key={c.source} className="card">
                <h3 className="h2">{sourceName(c.source)}</h3>
                <p className="text-sm text-muted">Last checked {day(c.checkedOn)}</p>
                <p className={`mt-2 font-semibold ${v.cls}`}>
                  <DropMark verdict={c.verdict} />
                  {v.word}
                </p>
                <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
                  {c.reasons.map((r) => (
                    <li key={r}>{r}</li>
                  ))}
                </ul>
                <p className="mt-2 text-xs text-muted">{ppmLabel(c)}</p>
              </section>
            );
          })}
        </div>
      ) : (
        <p className="card text-muted">No water checks yet.{canLog ? " Log the first one below." : ""}</p>
      )}

      {chartData ? (
        <section className="card">
          <Chart spec={spec} data={chartData} timeZone={timeZone} testId="water-chart" />
          {unplotted ? (
            <p className="mt-2 text-xs text-muted">
              {unplotted} TDS {unplotted === 1 ? "reading" : "readings"} without the meter's scale{" "}
              {unplotted === 1 ? "is" : "are"} in the table but not on the chart: a ppm figure stands for a different
              conductivity on a 0.5 and a 0.7 meter.
            </p>
          ) : null}
        </section>
      ) : null}

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,22rem)]">
        <section className="card relative overflow-x-auto" tabIndex={0} aria-labelledby="water-all-checks">
          <h3 id="water-all-checks" className="h2 mb-3">
            All checks
          </h3>
          {checks.length === 0 ? (
            <p className="text-sm text-muted">None yet.</p>
          ) : (
            <table className="table" data-testid="water-checks">
              <thead>
                <tr>
                  <th>Date</th>
                  <th>Source</th>
                  <th>Dissolved solids</th>
                  <th>pH</th>
                  <th>Verdict</th>
                  <th className="hidden sm:table-cell">By</th>
                  {canLog ? (
                    <th>
                      <span className="sr-only">Remove</span>
                    </th>
                  ) : null}
                </tr>
              </thead>
              <tbody>
                {[...checks].reverse().map((c) => (
                  <tr key={c.id}>
                    <td className="whitespace-nowrap">{day(c.checkedOn)}</td>
                    <td>{sourceName(c.source)}</td>
                    <td>{ppmLabel(c)}</td>
                    <td>
                      {c.ph ?? "–"}
                      {c.ph != null && c.buffered === false ? (
                        <span className="text-xs text-muted"> (no buffer: not judged)</span>
                      ) : null}
                    </td>
                    <td className={WATER_VERDICT[c.verdict].cls}>
                      <DropMark verdict={c.verdict} />
                      {c.verdict === "good"
                        ? "good"
                        : c.verdict === "adjust"
                          ? "needs attention"
                          : "not for routine use"}
                    </td>
                    <td className="hidden sm:table-cell">{c.byName ?? "–"}</td>
                    {canLog ? (
                      <td>
                        <Form
                          method="post"
                          onSubmit={(e) => {
                            if (!confirm("Remove this water check?")) e.preventDefault();
                          }}
                        >
                          <input type="hidden" name="intent" value="delete" />
                          <input type="hidden" name="checkId" value={c.id} />
                          <button className="text-xs text-muted underline hover:text-poor" disabled={busy}>
                            Remove
                          </button>
                        </Form>
                      </td>
                    ) : null}
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>

        {canLog ? (
          <section className="card">
            <h3 className="h2 mb-3">Log a check</h3>
            <Form method="post" className="space-y-3" ref={formRef} {...getFormProps(logForm)}>
              <input type="hidden" name="intent" value="log" />
              <div>
                <label className="label" htmlFor={logFields.source.id}>
                  Source
                </label>
                <select className="field" {...getSelectProps(logFields.source)}>
                  {STANDARD_SOURCES.map((s) => (
                    <option key={s} value={s}>
                      {sourceName(s)}
                    </option>
                  ))}
                  <option value="other">Another source (name it)</option>
                </select>
              </div>
              <div>
                <label className="label" htmlFor={logFields.ownSource.id}>
                  Its name, for another source
                </label>
                <input
                  className="field"
                  list="own-sources"
                  maxLength={40}
                  placeholder="e.g. Water butt, RO unit"
                  {...getInputProps(logFields.ownSource, { type: "text" })}
                />
                <datalist id="own-sources">
                  {ownSources.map((s) => (
                    <option key={s} value={s} />
                  ))}
                </datalist>
                <FieldError meta={logFields.ownSource} />
              </div>
              <div>
                <label className="label" htmlFor={logFields.checkedOn.id}>
                  Date
                </label>
                <input
                  className="field"
                  max={today}
                  required
                  {...getInputProps(logFields.checkedOn, { type: "date" })}
                />
                <FieldError meta={logFields.checkedOn} />
              </div>
              <fieldset>
                <legend className="label">The meter reads</legend>
                <div className="flex flex-wrap gap-4 text-sm">
                  {getCollectionProps(logFields.measure, { type: "radio", options: [...MEASURES] }).map(
                    ({ key, ...props }) => (
                      <label key={key} className="flex items-center gap-2">
                        <input {...props} /> {props.value === "ec" ? "EC in µS/cm" : "TDS in ppm"}
                      </label>
                    ),
                  )}
                </div>
              </fieldset>
              <div>
                <label className="label" htmlFor={logFields.value.id}>
                  Reading
                </label>
                <input
                  inputMode="decimal"
                  className="field"
                  placeholder="e.g. 280"
                  {...getInputProps(logFields.value, { type: "text" })}
                />
                <FieldError meta={logFields.value} />
              </div>
              <div>
                <label className="label" htmlFor={logFields.scale.id}>
                  Meter's ppm scale
                </label>
                <select className="field" {...getSelectProps(logFields.scale)}>
                  <option value="">Not sure</option>
                  <option value="0.5">0.5 — NaCl scale (ppm = µS/cm × 0.5)</option>
                  <option value="0.7">0.7 — 442 scale (ppm = µS/cm × 0.7)</option>
                </select>
                <p className="hint">
                  The meter's manual says which. It matters for a TDS reading in ppm: the same water reads 1.4 times
                  higher on a 0.7 meter.
                </p>
                <FieldError meta={logFields.scale} />
              </div>
              <div>
                <label className="label" htmlFor={logFields.ph.id}>
                  pH
                </label>
                <input
                  inputMode="decimal"
                  className="field"
                  placeholder="e.g. 6.2"
                  {...getInputProps(logFields.ph, { type: "text" })}
                />
                <FieldError meta={logFields.ph} />
              </div>
              <FormErrors errors={logForm.errors} />
              {logged ? (
                <p className="text-sm text-good" role="status">
                  ✓ Check saved.
                </p>
              ) : null}
              <button className="btn w-full" disabled={busy}>
                Save check
              </button>
            </Form>
          </section>
        ) : (
          <p className="text-sm text-muted">Mentors read the water checks; the owner and carers log them.</p>
        )}
      </div>
    </div>
  );
}
