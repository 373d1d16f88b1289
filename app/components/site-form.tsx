import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { useEffect, useState } from "react";
import { Form, useNavigation } from "react-router";
import { FormErrors, SelectField, TextField } from "~/components/field";

const zones = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : ["UTC"];

/** The browser's own time zone when the list knows it: the grower is most likely setting up where they live. */
export function browserTimeZone(): string | null {
  try {
    const tz = Intl.DateTimeFormat().resolvedOptions().timeZone;
    return tz && zones.includes(tz) ? tz : null;
  } catch {
    return null;
  }
}

/** Types a value into an uncontrolled input as the grower would, so the form and its library see it. */
function setInput(id: string, value: string) {
  const input = document.getElementById(id);
  if (!(input instanceof HTMLInputElement)) return;
  Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, "value")?.set?.call(input, value);
  input.dispatchEvent(new Event("input", { bubbles: true }));
}

type Locating =
  { state: "idle" } | { state: "asking" } | { state: "done"; accuracy: number } | { state: "failed"; message: string };

export function SiteForm({
  lastResult,
  defaultValue,
  submitLabel,
}: {
  lastResult?: SubmissionResult<string[]>;
  defaultValue?: { name: string; latitude: number; longitude: number; timeZone: string };
  submitLabel: string;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult,
    defaultValue: defaultValue ?? { timeZone: "" },
    // Validated by the action (the same zod schema); number fields round-trip more reliably that way.
    shouldValidate: "onSubmit",
  });
  const [zoneFrom, setZoneFrom] = useState<string | null>(null);
  const [locating, setLocating] = useState<Locating>({ state: "idle" });
  // A new site starts in the browser's time zone (the server cannot know it); an edited site keeps its own.
  useEffect(() => {
    if (defaultValue || lastResult) return;
    const tz = browserTimeZone();
    if (tz) {
      form.update({ name: fields.timeZone.name, value: tz });
      // eslint-disable-next-line react-hooks/set-state-in-effect -- the browser's zone is known only once hydrated
      setZoneFrom(tz);
    }
    // Once, on mount: later renders must not overwrite the zone the grower picked.
    // eslint-disable-next-line react-hooks/exhaustive-deps -- see above
  }, []);

  function fillFromDevice() {
    if (!("geolocation" in navigator))
      return setLocating({
        state: "failed",
        message: "This browser cannot tell its location; type the latitude and longitude.",
      });
    setLocating({ state: "asking" });
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        // Two decimals, about a kilometre: plenty for sunrise and sunset, and no closer than the grower needs to share.
        setInput(fields.latitude.id, pos.coords.latitude.toFixed(2));
        setInput(fields.longitude.id, pos.coords.longitude.toFixed(2));
        setLocating({ state: "done", accuracy: pos.coords.accuracy });
      },
      (err) =>
        setLocating({
          state: "failed",
          message:
            err.code === err.PERMISSION_DENIED
              ? "The browser was not allowed to share the location; type the latitude and longitude instead."
              : "The location could not be found just now; try again or type the latitude and longitude.",
        }),
      { enableHighAccuracy: false, timeout: 15_000, maximumAge: 600_000 },
    );
  }

  return (
    <Form method="post" className="space-y-5" {...getFormProps(form)}>
      <FormErrors errors={form.errors} />
      <TextField meta={fields.name} label="Name" hint="What you call the place: a home, a flat, an allotment." />
      <div className="flex flex-wrap items-center gap-3">
        <button
          type="button"
          className="btn-quiet"
          onClick={fillFromDevice}
          disabled={locating.state === "asking"}
          data-testid="use-my-location"
        >
          {locating.state === "asking" ? "Finding this device…" : "Use my location"}
        </button>
        <p className="text-sm text-muted" role="status" data-testid="location-status">
          {locating.state === "done"
            ? `Filled in from this device (to about ` +
              `${locating.accuracy < 1000 ? `${Math.round(locating.accuracy)} m` : `${Math.round(locating.accuracy / 1000)} km`}` +
              `). Check them before saving.`
            : locating.state === "failed"
              ? locating.message
              : "Or type them: the browser asks before it shares anything, and only the two numbers are saved."}
        </p>
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField
          meta={fields.latitude}
          label="Latitude (°, north positive)"
          type="text"
          inputMode="decimal"
          hint="South of the equator is negative."
        />
        <TextField
          meta={fields.longitude}
          label="Longitude (°, east positive)"
          type="text"
          inputMode="decimal"
          hint="West of Greenwich is negative."
        />
      </div>
      <p className="hint -mt-2">
        Why we ask: sunrise and sunset at your place split each day from its night, so the day–night difference your
        plants feel is measured at your own hours. The hemisphere follows from the latitude and sets which months are
        winter. Two decimals (about a kilometre) are plenty.
      </p>
      <SelectField
        meta={fields.timeZone}
        label="Time zone"
        hint={
          zoneFrom
            ? `Taken from this device's clock (${zoneFrom.replace(/_/g, " ")}); change it if the place is elsewhere.`
            : undefined
        }
        options={[
          { value: "", label: "Choose a time zone" },
          ...zones.map((z) => ({ value: z, label: z.replace(/_/g, " ") })),
        ]}
      />
      <button className="btn" disabled={navigation.state !== "idle"}>
        {submitLabel}
      </button>
    </Form>
  );
}
