import { LIGHT_SOURCE_LABELS } from "~/domain/climate/light";
import type { LightSource } from "~/domain/vocabulary";

/** Beside the DLI figures: which lux factor they use, and a light sensor that clips. */
export function LightNotes({
  profile,
  lightSource,
}: {
  profile: {
    luxPerPpfd: number;
    luxClipped: { ceilingLux: number } | null;
    year: { name: string; luxClipped: unknown }[];
  };
  lightSource: LightSource;
}) {
  const clipped = profile.luxClipped;
  const months = profile.year.filter((m) => m.luxClipped).map((m) => m.name);
  return (
    <>
      {lightSource !== "sun" ? (
        <p className="mt-2 text-xs text-muted" data-testid="light-source-note">
          DLI here counts {profile.luxPerPpfd} lux as 1 µmol m⁻² s⁻¹ of plant light:{" "}
          {LIGHT_SOURCE_LABELS[lightSource].toLowerCase()}, as set for this spot.
        </p>
      ) : null}
      {clipped ? (
        <p className="caution mt-2 p-2 text-sm" role="note" data-testid="lux-clipped">
          Your light sensor tops out at about {(Math.round(clipped.ceilingLux / 1000) * 1000).toLocaleString("en")} lux:
          the sunniest hours read low, so the DLI{months.length ? ` of ${months.join(", ")}` : ""} is a lower bound.
        </p>
      ) : null}
    </>
  );
}
