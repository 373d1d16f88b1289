import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useState } from "react";
import { Form, redirect, useNavigation } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { createSensor, PlacementError } from "~/.server/sensors.server";
import { getSite } from "~/.server/sites";
import { getSpot, listSpots } from "~/.server/spots";
import { FormErrors, SelectField, TextField } from "~/components/field";
import { CHANNELS, sensorSchema } from "~/forms/sensor";
import { parseLocalDateTime } from "~/lib/time";
import type { Route } from "./+types/sensors.new";

export const meta: Route.MetaFunction = () => [{ title: "Add a sensor · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ["owner"]);
  return { spots: await listSpots(siteId), timeZone: (await getSite(siteId)).timeZone };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const submission = parseWithZod(await readForm(request), { schema: sensorSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  const { name, channels, spotId, since, sinceAt } = submission.value;
  if (spotId) await getSpot(siteId, spotId);
  let from: "first" | "now" | Date = since === "at" ? "now" : since;
  if (spotId && since === "at") {
    const parsed = sinceAt ? parseLocalDateTime(sinceAt, (await getSite(siteId)).timeZone) : null;
    if (!parsed)
      return { result: submission.reply({ fieldErrors: { sinceAt: ["Enter the date and time it was put there."] } }) };
    from = parsed;
  }
  let created;
  try {
    created = await createSensor({ siteId, name, channels, spotId, since: from, actorId: user.id });
  } catch (err) {
    if (err instanceof PlacementError) return { result: submission.reply({ fieldErrors: { sinceAt: [err.message] } }) };
    throw err;
  }
  const { id, secret } = created;
  // The secret travels once, in the URL fragment, which browsers never send to the server.
  return redirect(`/sites/${siteId}/sensors/${id}?new=1#secret=${secret}`);
}

export default function NewSensor({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData?.result,
    defaultValue: { channels: ["temperature", "humidity"] },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: sensorSchema }),
    shouldValidate: "onBlur",
    // An error clears as the field is corrected, so the button does not move under the pointer on blur.
    shouldRevalidate: "onInput",
  });
  const channelList = fields.channels;
  return (
    <div className="max-w-xl">
      <h2 className="h2 mb-1">Add a sensor</h2>
      <p className="mb-4 text-muted">A cheap temperature and humidity sensor is enough; some also read light.</p>
      <div className="card">
        <Form method="post" className="space-y-5" {...getFormProps(form)}>
          <FormErrors errors={form.errors} />
          <TextField meta={fields.name} label="Name" placeholder="Kitchen sill sensor" />
          <fieldset>
            <legend className="label">What it reports</legend>
            <div className="mt-1 flex flex-wrap gap-3">
              {CHANNELS.map((c) => (
                <label
                  key={c}
                  className="inline-flex items-center gap-2 rounded-[0.2rem] border border-stone-line bg-white px-3 py-2 text-sm"
                >
                  <input
                    type="checkbox"
                    name={channelList.name}
                    value={c}
                    defaultChecked={c === "temperature" || c === "humidity"}
                  />
                  {c === "lux" ? "light (lux)" : c}
                </label>
              ))}
            </div>
            {channelList.errors ? <p className="error">{channelList.errors.join(" ")}</p> : null}
          </fieldset>
          <SelectField
            meta={fields.spotId}
            label="Place it in"
            options={[
              { value: "", label: "Not placed yet" },
              ...loaderData.spots.map((s) => ({ value: String(s.id), label: s.name })),
            ]}
          />
          <SinceField
            name={fields.since.name}
            atName={fields.sinceAt.name}
            errors={fields.sinceAt.errors}
            timeZone={loaderData.timeZone}
          />
          <button className="btn" disabled={navigation.state !== "idle"}>
            Add sensor
          </button>
        </Form>
      </div>
    </div>
  );
}

/** Since when the placement counts: by default from its first reading, so stored data lands in the spot. */
function SinceField({
  name,
  atName,
  errors,
  timeZone,
}: {
  name: string;
  atName: string;
  errors?: string[];
  timeZone: string;
}) {
  const [since, setSince] = useState<"first" | "now" | "at">("first");
  const option = (value: typeof since, label: string) => (
    <label className="inline-flex items-center gap-2">
      <input type="radio" name={name} value={value} checked={since === value} onChange={() => setSince(value)} />{" "}
      {label}
    </label>
  );
  return (
    <fieldset>
      <legend className="label">Since when (if placed)</legend>
      <div className="mt-1 flex flex-wrap gap-4 text-sm">
        {option("first", "From its first reading")}
        {option("now", "From now")}
        {option("at", "From a date")}
      </div>
      <p className="hint">
        {since === "first"
          ? "Readings it stored before you added it (a logger's past months, a buffer while offline) count for this spot too."
          : since === "now"
            ? "Readings with earlier times will be in no spot; the sensor's page shows them and can put them in a spot later."
            : "Readings from before this time will be in no spot until you put them in one on the sensor's page."}
      </p>
      {since === "at" ? (
        <div className="mt-2">
          <label className="label" htmlFor="sinceAt">
            Put there at ({timeZone.replace(/_/g, " ")} time)
          </label>
          <input id="sinceAt" name={atName} type="datetime-local" className="field" required />
        </div>
      ) : null}
      {errors ? <p className="error">{errors.join(" ")}</p> : null}
    </fieldset>
  );
}
