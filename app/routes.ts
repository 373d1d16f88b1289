import { index, layout, route, type RouteConfig } from "@react-router/dev/routes";

export default [
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-up", "routes/sign-up.tsx"),
  route("sign-out", "routes/sign-out.tsx"),

  layout("routes/shell.tsx", [
    index("routes/home.tsx"),
    route("sites/new", "routes/sites.new.tsx"),
    route("settings", "routes/settings.tsx"),
    route("admin", "routes/admin.tsx"),
    route("sites/:siteId", "routes/site.tsx", [
      index("routes/site.spots.tsx"),
      route("edit", "routes/site.edit.tsx"),
      route("spots/new", "routes/spots.new.tsx"),
      route("spots/:spotId", "routes/spots.$spotId.tsx"),
      route("spots/:spotId/edit", "routes/spots.$spotId.edit.tsx"),
      route("sensors", "routes/sensors.tsx"),
      route("sensors/new", "routes/sensors.new.tsx"),
      route("sensors/:sensorId", "routes/sensors.$sensorId.tsx"),
      route("import", "routes/import.tsx"),
      route("members", "routes/members.tsx"),
    ]),
  ]),

  route("api/ingest", "routes/api.ingest.ts"),
  route("api/sites/:siteId/spots/:spotId/series", "routes/api.series.ts"),
  route("api/sites/:siteId/spots/:spotId/latest", "routes/api.latest.ts"),
  route("api/sites/:siteId/sensors/:sensorId/status", "routes/api.sensor-status.ts"),
] satisfies RouteConfig;
