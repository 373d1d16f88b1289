// The API, documented with examples filled in for the reader's own first site and spot.
import { requireUser } from "~/.server/auth";
import { env } from "~/.server/env";
import { listSpots } from "~/.server/spots";
import { mySites } from "~/.server/sites";
import type { Route } from "./+types/api-docs";
import { IntoIcon, OutOfIcon } from "~/components/icons";

export const meta: Route.MetaFunction = () => [{ title: "API · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const sites = await mySites(user.id);
  const site = sites[0];
  const spot = site ? (await listSpots(site.id))[0] : undefined;
  const e = env();
  return {
    origin: new URL(request.url).origin,
    mqttHost: e.MQTT_PUBLIC_HOST ?? (e.MQTT_HOST === "0.0.0.0" ? new URL(request.url).hostname : e.MQTT_HOST),
    mqttPort: e.MQTT_PORT,
    siteId: site?.id ?? 1,
    spotId: spot?.id ?? 1,
    spotName: spot?.name ?? null,
    email: user.email,
  };
}

/** A command and what Nichewise answers, split into labelled parts (docs/design.md: no dark terminal boxes). */
function chunks(text: string) {
  const out: { kind: "ask" | "answer"; lines: string[] }[] = [];
  let continued = false;
  for (const line of text.split("\n")) {
    if (line.trim() === "") {
      continued = false;
      continue;
    }
    // A shell comment ("# A spot with three weeks of readings") belongs with the command under it.
    const kind: "ask" | "answer" = continued || /^(curl|mosquitto_pub|#)/.test(line) ? "ask" : "answer";
    const last = out.at(-1);
    if (last && last.kind === kind && (kind === "answer" || continued || last.lines.at(-1)!.startsWith("#")))
      last.lines.push(line);
    else out.push({ kind, lines: [line] });
    continued = kind === "ask" && line.endsWith("\\");
  }
  return out;
}

function Code({ children }: { children: string }) {
  return (
    <div className="api-sample" data-testid="api-sample">
      {chunks(children).map((c, i) => (
        <figure key={i} className={c.kind === "ask" ? "api-ask" : "api-answer"}>
          <figcaption className="eyebrow">{c.kind === "ask" ? "You send" : "Nichewise answers"}</figcaption>
          <pre tabIndex={0} className="overflow-x-auto text-xs leading-relaxed">
            {c.lines.join("\n")}
          </pre>
        </figure>
      ))}
    </div>
  );
}

/** What a method does, in words; the method itself stays beside it for scripts. */
const VERB: Record<string, string> = { GET: "Read", POST: "Send", MQTT: "Publish" };

function Endpoint({
  method,
  path,
  who,
  children,
}: {
  method: string;
  path: string;
  who: string;
  children: React.ReactNode;
}) {
  return (
    <div className="space-y-2 border-t border-stone-line pt-4 first:border-t-0 first:pt-0">
      <h3 className="api-endpoint flex items-start gap-3">
        <span className="mt-0.5 grid size-9 shrink-0 place-items-center rounded-t-full rounded-b-[0.2rem] bg-stone text-ink">
          {method === "GET" ? <OutOfIcon size={20} /> : <IntoIcon size={20} />}
        </span>
        <span className="min-w-0">
          <span className="eyebrow block text-ink">
            {VERB[method] ?? method}{" "}
            <span className="font-mono font-medium tracking-normal normal-case">({method})</span>
          </span>
          <code className="block font-mono text-sm font-semibold break-all">{path}</code>
        </span>
      </h3>
      <p className="text-sm text-muted">{who}</p>
      {children}
    </div>
  );
}

export default function ApiDocs({ loaderData: d }: Route.ComponentProps) {
  const spot = `${d.origin}/api/sites/${d.siteId}/spots/${d.spotId}`;
  return (
    <main className="mx-auto max-w-4xl space-y-6 px-4 pt-6 pb-16 sm:px-6">
      <div>
        <h1 className="h1">The Nichewise API</h1>
        <p className="mt-2 text-muted">
          Sensors send readings in; you take series, season profiles and exports out. Examples below use your own first
          site
          {d.spotName ? ` and the spot "${d.spotName}"` : ""} (site {d.siteId}, spot {d.spotId}).
        </p>
      </div>

      <section className="card space-y-3">
        <h2 className="h2">Signing in from a script</h2>
        <p className="text-sm">
          Sensors authenticate with their own id and secret (below). Everything else answers to your signed-in session,
          the same as the pages: sign in once with curl and keep the cookie. You see exactly what your role in the site
          lets you see; another site's ids answer 404.
        </p>
        <Code>{`curl -c cookies.txt -d 'email=${d.email}' --data-urlencode 'password=YOUR PASSWORD' ${d.origin}/sign-in`}</Code>
      </section>

      <section className="card space-y-4">
        <h2 className="h2">Ingest: readings in</h2>
        <Endpoint
          method="MQTT"
          path={`nichewise/sensors/<id>/reading`}
          who="A sensor, with user name = its id and password = its secret (shown once when it is added), QoS 1."
        >
          <p className="text-sm">
            A JSON object with any of <code>temperature</code> (°C, or °F with <code>"unit":"F"</code>),{" "}
            <code>humidity</code> (%), <code>lux</code>, <code>battery</code> (%), and an optional <code>time</code>{" "}
            (ISO 8601 with a zone, or epoch seconds or milliseconds). Plain numbers go to <code>…/temperature</code>,{" "}
            <code>…/humidity</code>, <code>…/lux</code> or <code>…/battery</code>. A payload that cannot be read is
            acknowledged and recorded with its reason (the admin's ingest health page lists them).
          </p>
          <Code>{`mosquitto_pub -h ${d.mqttHost} -p ${d.mqttPort} -q 1 -u 7 -P 'SECRET' -t nichewise/sensors/7/reading \\
  -m '{"temperature":18.4,"humidity":56}'`}</Code>
        </Endpoint>
        <Endpoint method="POST" path="/api/ingest" who="A sensor, with Authorization: Bearer <id>.<secret>.">
          <p className="text-sm">
            One reading, an array, or <code>{`{"readings":[…]}`}</code> with up to 10,000 buffered readings (4 MB). The
            answer comes after the commit and lists each rejected reading with its reason.
          </p>
          <Code>{`curl -X POST ${d.origin}/api/ingest -H 'Authorization: Bearer 7.SECRET' \\
  -H 'Content-Type: application/json' \\
  -d '{"readings":[{"time":"2026-12-01T21:00:00Z","temperature":18.4,"humidity":56}]}'`}</Code>
          <Code>{`{"received":1,"accepted":1,"stored":1,"duplicates":0,"rejected":[]}`}</Code>
        </Endpoint>
      </section>

      <section className="card space-y-4">
        <h2 className="h2">Series: chart data</h2>
        <Endpoint
          method="GET"
          path="/api/sites/:siteId/spots/:spotId/series?range=48h|30d|year"
          who="Any member of the site."
        >
          <p className="text-sm">
            Columnar JSON (one array per column, times in epoch seconds), calibrated. <code>48h</code> gives raw
            readings (<code>temp</code>, <code>rh</code>, <code>margin</code> = air temperature minus dew point);{" "}
            <code>30d</code> hourly means with <code>t_min</code>/<code>t_max</code>; <code>year</code> daily{" "}
            <code>low</code>/<code>high</code> in the site's time zone.
          </p>
          <Code>{`curl -b cookies.txt '${spot}/series?range=30d'
{"resolution":"hour","t":[1764547200,…],"temp":[17.2,…],"rh":[61.5,…],"t_min":[…],"t_max":[…],"margin":[…]}`}</Code>
        </Endpoint>
        <Endpoint method="GET" path="/api/sites/:siteId/spots/:spotId/latest" who="Any member of the site.">
          <Code>{`curl -b cookies.txt '${spot}/latest'`}</Code>
        </Endpoint>
      </section>

      <section className="card space-y-4">
        <h2 className="h2">Fits: which plant groups suit a spot</h2>
        <Endpoint
          method="GET"
          path="/api/sites/:siteId/spots/:spotId/fits?from=YYYY-MM&to=YYYY-MM&glazing=single|old_double|double|triple"
          who={
            "Any member of the site. from and to are months in the site's " +
            "time zone (at most 36 months); without them, the spot's latest " +
            "twelve months with readings, as on the spot page."
          }
        >
          <p className="text-sm">
            Every plant group of the site, best fit first (ranked by how far the spot misses each: degree-hours past the
            group's damage lines, then past its comfort range). Each has a stable <code>level</code> (<code>good</code>,{" "}
            <code>care</code>, <code>poor</code>, <code>unknown</code> = not enough data yet), the page's{" "}
            <code>verdict</code>, <code>seasonal</code> (months an outdoor spot suits it, or null), and each rule's{" "}
            <code>level</code>, <code>facts</code> and <code>text</code>. Facts are numbers and dates, always in °C
            (degree-hours in K·h); <code>text</code> says the same in your temperature unit. <code>glazing</code> adds
            the cold-glass check for a windowsill, read against the site's outdoor spot. A malformed or out-of-range
            month is a 400 with <code>{`{"error"}`}</code>.
          </p>
          <p className="text-sm">
            <strong>Measured and projected months.</strong> For a period running to today, months without enough
            readings (fewer than 20 days) are judged from the spot's projection — its response to the outdoor weather
            played through the site's past years — once it has one (about two weeks of readings and the site's weather
            fetched). <code>basis</code> says what the fits rest on: <code>confidence</code> (<code>measured</code>: no
            month projected; <code>projected</code>: no month measured yet; <code>mixed</code>),{" "}
            <code>measuredMonths</code> and <code>projectedMonths</code> (1–12; <code>blendedMonths</code> are partly
            measured), <code>years</code> of past weather played through, and <code>firmBy</code>, the site's local date
            by which every month will have been measured if the sensor stays. Each fit has its own{" "}
            <code>confidence</code> (a verdict ruled by a measured <code>poor</code> is <code>measured</code>) and{" "}
            <code>verdictText</code> ("likely thrives here — 3 of 12 months measured, the rest projected from 10 past
            years of weather; firm by 14 May"). Each rule has a <code>confidence</code>: <code>measured</code> (its
            level rests on readings), <code>projected</code> (on projected months only) or <code>mixed</code> (fine on
            both). A projection never rules a group out: a rule that projected months alone would make <code>poor</code>{" "}
            is <code>care</code> with <code>"likely":"poor"</code> and facts of kind <code>projected-cold</code>,{" "}
            <code>projected-heat</code>, <code>projected-warm-nights</code>, <code>projected-humidity</code>,{" "}
            <code>projected-ok</code> or <code>projected-cue</code>, each with the month, the figure and its 80 % range
            (<code>rangeC</code>). Measured months always win: a measured month is never judged from its projection.
          </p>
          <Code>
            {`curl -b cookies.txt '${spot}/fits?from=2025-01&to=2025-12'
{"spot":{"id":1,…},"period":{"from":"2025-01-01T00:00:00.000Z","to":"2026-01-01T00:00:00.000Z","firstMonth":"2025-01","lastMonth":"2025-12","toToday":false},
 "basis":{"confidence":"measured","measuredMonths":[1,2,3,4,5,6,7,8,9,10,11,12],"projectedMonths":[],"blendedMonths":[],"years":0,"firmBy":null},
 "fits":[{"key":"phalaenopsis","level":"care","verdict":"possible with care","confidence":"measured","verdictText":"possible with care",` +
              `"miss":{"damage":0,"comfort":3},
   "rules":[{"rule":"cold-nights","level":"care","confidence":"measured","months":["01"],
     "facts":[{"kind":"cold-snap","comfortC":16,"damageC":10,"nights":1,"worst":[{"date":"2025-01-17","valueC":13.9,"hours":1}],"degreeHours":2.1}],
     "text":"A brief cold snap: 1 night under 16 °C (17 Jan: 13.9 °C for 1 hour), above the 10 °C damage line — …"},…]},…]}

# A spot with three weeks of readings (November measured, the rest projected):
curl -b cookies.txt '${spot}/fits'
{…,"basis":{"confidence":"mixed","measuredMonths":[11],"projectedMonths":[1,2,3,4,5,6,7,8,9,10,12],"blendedMonths":[12],"years":10,"firmBy":"2027-10-20"},
 "fits":[…,{"key":"phalaenopsis","level":"care","verdict":"possible with care","confidence":"mixed",
   "verdictText":"likely possible with care — 1 of 12 months measured (December partly), ` +
              `the rest projected from 10 past years of weather; firm by 20 October 2027",
   "rules":[{"rule":"cold-nights","level":"care","confidence":"projected","likely":"poor","months":["01"],
     "facts":[{"kind":"projected-cold","line":"damage","lineC":10,"months":[1],"worstMonth":1,"lowC":6,"rangeC":[4,8],"years":10},…],
     "text":"January is likely to fall to 6 °C here (80 % range 4 to 8 °C, from 10 past years of weather), ` +
              `under Phalaenopsis's 10 °C damage line: plan to move it in January. …"},…]},…]}`}
          </Code>
        </Endpoint>
      </section>

      <section className="card space-y-4">
        <h2 className="h2">Exports and season profiles</h2>
        <Endpoint
          method="GET"
          path="/api/sites/:siteId/spots/:spotId/export?what=raw|hourly|profile&format=csv|json&from=YYYY-MM-DD&to=YYYY-MM-DD"
          who="Any member of the site. from and to are the site's local dates (to included); without them, the last twelve months."
        >
          <ul className="list-disc space-y-1 pl-5 text-sm">
            <li>
              <code>what=raw</code>: every reading, columns <code>time</code> (UTC), <code>sensor_id</code>,{" "}
              <code>temperature_c</code>, <code>humidity_pct</code>, <code>lux</code>, <code>battery_pct</code>, with
              the sensor's calibration applied. Streamed from the database, so a year of one-minute readings (about
              525,600 rows) downloads without waiting for the whole file.
            </li>
            <li>
              <code>what=hourly</code>: the hourly rollups: sample counts, mean, lowest and highest temperature and
              humidity, the smallest dew-point margin and mean light of each local hour.
            </li>
            <li>
              <code>what=profile</code>: the season profile of the period, one row per calendar month and per season:
              lowest, highest, 5th and 95th percentile of hourly temperature, mean daily low and high, day–night
              difference, humidity, hours near condensation, mean daily light integral.
            </li>
          </ul>
          <p className="text-sm">
            JSON answers are <code>{`{"meta":{…},"columns":[…],"rows":[[…],…]}`}</code> (profile:{" "}
            <code>{`{"meta","months","seasons"}`}</code>
            ); CSV has a header line. Bad parameters answer 400 with <code>{`{"error":"…"}`}</code>.
          </p>
          <Code>{`curl -b cookies.txt -OJ '${spot}/export?what=raw&format=csv&from=2025-01-01&to=2025-12-31'
time,sensor_id,temperature_c,humidity_pct,lux,battery_pct
2025-01-01T00:00:00.000Z,7,14.2,63.5,,88

curl -b cookies.txt '${spot}/export?what=profile&format=json'
{"meta":{"spot":"…","hemisphere":"northern",…},"months":[{"key":"2025-01","temperature":{"lowest":9.8,…},…}],"seasons":[…]}`}</Code>
        </Endpoint>
      </section>
    </main>
  );
}
