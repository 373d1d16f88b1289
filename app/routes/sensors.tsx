import { Link } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { sensorsWithUnplaced } from "~/.server/placements";
import { listSensors } from "~/.server/sensors.server";
import { timeAgo } from "~/lib/date-words";
import type { Route } from "./+types/sensors";
import { SensorIcon } from "~/components/icons";

export const meta: Route.MetaFunction = () => [{ title: "Sensors · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [sensors, unplaced] = await Promise.all([listSensors(siteId), sensorsWithUnplaced(siteId)]);
  return { role, sensors: sensors.map((s) => ({ ...s, unplaced: unplaced.has(s.id) })), now: Date.now() };
}

export const QUIET_AFTER_MS = 30 * 60_000;

export default function Sensors({ loaderData, params }: Route.ComponentProps) {
  const { sensors, role, now } = loaderData;
  return (
    <section>
      <div className="mb-4 flex items-center justify-between gap-4">
        <p className="text-muted">Each physical device, where it is now, and when it was last heard from.</p>
        {role === "owner" ? (
          <Link to={`/sites/${params.siteId}/sensors/new`} className="btn">
            Add a sensor
          </Link>
        ) : null}
      </div>
      <ul className="shelf-list">
        {sensors.length === 0 ? <li className="p-5 text-muted">No sensors yet.</li> : null}
        {sensors.map((s) => {
          const quiet = !s.lastSeenAt || now - new Date(s.lastSeenAt).getTime() > QUIET_AFTER_MS;
          return (
            <li key={s.id}>
              <Link
                to={`/sites/${params.siteId}/sensors/${s.id}${s.unplaced ? "#placements" : ""}`}
                className="flex flex-wrap items-center gap-x-4 gap-y-1 p-4 hover:bg-paper"
              >
                <span className="inline-flex items-center gap-2 font-semibold">
                  <SensorIcon size={18} />
                  {s.name}
                </span>
                <span className="text-sm text-muted">{s.spotName ? `in ${s.spotName}` : "not placed"}</span>
                {s.unplaced ? (
                  <span className="text-sm font-medium text-care">some readings are in no spot</span>
                ) : null}
                <span className={`ml-auto text-sm ${quiet ? "font-medium text-care" : "text-muted"}`}>
                  {quiet ? "Quiet — " : ""}last heard {timeAgo(s.lastSeenAt, now)}
                  {s.battery != null ? ` · battery ${Math.round(s.battery)} %` : ""}
                </span>
              </Link>
            </li>
          );
        })}
      </ul>
    </section>
  );
}
