import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form, redirect, useNavigation } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { db } from "~/.server/db";
import { placeSensor } from "~/.server/placements";
import { hashSensorSecret, newSensorSecret } from "~/.server/secrets";
import { getSpot, listSpots } from "~/.server/sites";
import { FormErrors, SelectField, TextField } from "~/components/field";
import { auditLog, sensors } from "~/db/schema.server";
import { CHANNELS, sensorSchema } from "~/lib/forms";
import type { Route } from "./+types/sensors.new";

export const meta: Route.MetaFunction = () => [{ title: "Add a sensor · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ["owner"]);
  return { spots: await listSpots(siteId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const submission = parseWithZod(await request.formData(), { schema: sensorSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  const { name, channels, spotId } = submission.value;
  if (spotId) await getSpot(siteId, spotId);
  const secret = newSensorSecret();
  const [sensor] = await db()
    .insert(sensors)
    .values({ siteId, name, channels, secretHash: hashSensorSecret(secret) })
    .returning({ id: sensors.id });
  await db().insert(auditLog).values({ siteId, actorId: user.id, action: "sensor.create", detail: { sensorId: sensor.id, name } });
  if (spotId) await placeSensor({ siteId, sensorId: sensor.id, spotId, at: new Date(), actorId: user.id });
  // The secret travels once, in the URL fragment, which browsers never send to the server.
  return redirect(`/sites/${siteId}/sensors/${sensor.id}?new=1#secret=${secret}`);
}

export default function NewSensor({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData?.result,
    defaultValue: { channels: ["temperature", "humidity"] },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: sensorSchema }),
    shouldValidate: "onBlur",
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
                <label key={c} className="inline-flex items-center gap-2 rounded-lg border border-line bg-white px-3 py-2 text-sm">
                  <input type="checkbox" name={channelList.name} value={c} defaultChecked={c === "temperature" || c === "humidity"} />
                  {c === "lux" ? "light (lux)" : c}
                </label>
              ))}
            </div>
            {channelList.errors ? <p className="error">{channelList.errors.join(" ")}</p> : null}
          </fieldset>
          <SelectField
            meta={fields.spotId}
            label="Place it in"
            options={[{ value: "", label: "Not placed yet" }, ...loaderData.spots.map((s) => ({ value: String(s.id), label: s.name }))]}
          />
          <button className="btn" disabled={navigation.state !== "idle"}>
            Add sensor
          </button>
        </Form>
      </div>
    </div>
  );
}
