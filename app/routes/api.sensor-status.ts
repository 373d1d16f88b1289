import { desc, eq } from "drizzle-orm";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { db } from "~/.server/db";
import { getSensor } from "~/.server/sensors.server";
import { readings } from "~/db/schema.server";
import type { Route } from "./+types/api.sensor-status";

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const sensor = await getSensor(siteId, params.sensorId);
  const [latest] = await db()
    .select({ measuredAt: readings.measuredAt, temperature: readings.temperature, humidity: readings.humidity })
    .from(readings)
    .where(eq(readings.sensorId, sensor.id))
    .orderBy(desc(readings.measuredAt))
    .limit(1);
  return Response.json(
    { lastSeenAt: sensor.lastSeenAt, battery: sensor.battery, latest: latest ?? null },
    { headers: { "Cache-Control": "no-store" } },
  );
}
