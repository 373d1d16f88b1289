// The sensor a topic's readings go to: one the site has, or a new one made in the same step (named
// after the device, placed in a spot from its first reading), so a grower who has not added the
// sensor yet does not have to leave the page while listening runs.
export type SensorOption = { id: number; name: string; spotName: string | null };
export type SpotOption = { id: number; name: string };

/** The select's value for a new sensor: "new:<spot id>", or "new:" for one not placed yet. */
export const NEW_SENSOR = "new:";

export function SensorChoice(props: {
  id?: string;
  label?: string;
  sensors: SensorOption[];
  spots: SpotOption[];
  /** The name a new sensor would get, when it is known (a heard topic). */
  newName?: string;
}) {
  const called = props.newName ? ` “${props.newName}”` : "";
  return (
    <select
      className="field w-full sm:w-72"
      id={props.id}
      name="sensorId"
      required
      defaultValue=""
      aria-label={props.label}
    >
      <option value="" disabled>
        Choose a sensor…
      </option>
      {props.sensors.map((s) => (
        <option key={s.id} value={s.id}>
          {s.name}
          {s.spotName ? ` (in ${s.spotName})` : " (not placed)"}
        </option>
      ))}
      <optgroup label="Or add it as a new sensor">
        {props.spots.map((s) => (
          <option key={s.id} value={`${NEW_SENSOR}${s.id}`}>
            New sensor{called} in {s.name}
          </option>
        ))}
        <option value={NEW_SENSOR}>New sensor{called}, not placed yet</option>
      </optgroup>
    </select>
  );
}
