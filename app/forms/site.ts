// The site form (new site, edit site).
import { z } from "zod";

export const siteSchema = z.object({
  name: z.string({ error: "Name your site" }).trim().min(1, "Name your site").max(80),
  latitude: z
    .number({ error: "Enter the latitude in degrees (north positive)" })
    .min(-90, "Latitude is between −90 and 90")
    .max(90, "Latitude is between −90 and 90"),
  longitude: z
    .number({ error: "Enter the longitude in degrees (east positive)" })
    .min(-180, "Longitude is between −180 and 180")
    .max(180, "Longitude is between −180 and 180"),
  timeZone: z
    .string({ error: "Choose a time zone" })
    .refine((tz) => isTimeZone(tz), "Choose a time zone from the list"),
});

export function isTimeZone(tz: string) {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return tz.length > 0;
  } catch {
    return false;
  }
}
