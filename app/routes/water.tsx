import { useMemo } from "react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { getSite } from "~/.server/sites";
import { readForm, refuseForm } from "~/.server/ids";
import { addWaterCheck, deleteWaterCheck, listWaterChecks } from "~/.server/water";
import { waterSchema } from "~/forms/water";
import { parseSource, STANDARD_SOURCES } from "~/domain/water/logged-check";
import { PH_MAX, PH_MIN, ROUTINE_WATERING_MAX_EC, routineLimitPpm, UNBUFFERED_MAX_EC } from "~/domain/water/verdict";
import { toLocalInputValue, zonedToUtc } from "~/lib/time";
import type { Route } from "./+types/water";
import { WaterIcon } from "~/components/icons";
import { WaterCheckForm } from "~/components/water-check-form";
import { WaterChart } from "~/components/water-chart";
import { AllChecks, LatestChecks } from "~/components/water-checks";

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
  const sources = useMemo(() => [...new Set(checks.map((c) => c.source))], [checks]);
  const ownSources = sources.filter((s) => !(STANDARD_SOURCES as readonly string[]).includes(s));

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

      <LatestChecks checks={checks} sources={sources} timeZone={timeZone} canLog={canLog} />
      <WaterChart checks={checks} sources={sources} timeZone={timeZone} />

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,22rem)]">
        <AllChecks checks={checks} timeZone={timeZone} canLog={canLog} busy={busy} />
        {canLog ? (
          <WaterCheckForm
            today={today}
            ownSources={ownSources}
            lastResult={actionData && "result" in actionData ? actionData.result : undefined}
            saved={logged ? actionData : undefined}
            busy={busy}
          />
        ) : (
          <p className="text-sm text-muted">Mentors read the water checks; the owner and carers log them.</p>
        )}
      </div>
    </div>
  );
}
