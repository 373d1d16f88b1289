import { Form, Link } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { sitePlants, siteWishlist } from "~/.server/plants";
import { formatTemp } from "~/domain/units";
import type { Route } from "./+types/plants";

export const meta: Route.MetaFunction = () => [{ title: "Plants · Nichewise" }];

const CATEGORIES = ["cool", "intermediate", "warm"] as const;
const LIGHTS = ["low", "medium", "high"] as const;
const LIGHT_WORDS = {
  low: "low light (shaded window)",
  medium: "medium light (bright, some sun)",
  high: "high light (sun for part of the day)",
};

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [plants, wishes] = await Promise.all([sitePlants(siteId), siteWishlist(siteId)]);
  const q = new URL(request.url).searchParams;
  const text = (q.get("q") ?? "").trim().slice(0, 80);
  const category = CATEGORIES.find((c) => c === q.get("category")) ?? "";
  const light = LIGHTS.find((l) => l === q.get("light")) ?? "";
  const source = q.get("source") === "own" ? "own" : q.get("source") === "library" ? "library" : "";
  const needle = text.toLowerCase();
  const shown = plants.filter(
    (p) =>
      (!needle || `${p.name} ${p.summary}`.toLowerCase().includes(needle)) &&
      (!category || p.category === category) &&
      (!light || p.light === light) &&
      (!source || (source === "own") === p.own),
  );
  const wanted = new Set(wishes.map((w) => w.plantKey));
  return {
    role,
    unit: user.temperatureUnit,
    filters: { q: text, category, light, source },
    total: plants.length,
    plants: shown.map((p) => ({
      key: p.key,
      name: p.name,
      // Cool / intermediate / warm are orchid terms.
      category: p.group === "orchid" ? p.category : null,
      light: p.light,
      minNightC: p.minNightC,
      maxDayC: p.maxDayC,
      summary: p.summary,
      own: p.own,
      wanted: wanted.has(p.key),
    })),
  };
}

export default function Plants({ loaderData }: Route.ComponentProps) {
  const { plants, filters, unit, role, total } = loaderData;
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 className="h2">Plants</h2>
          <p className="text-sm text-muted">
            Published culture guidance for plant groups hobbyists grow, and this site's own profiles.
          </p>
        </div>
        {role === "owner" ? (
          <Link to="new" className="btn">
            Add your own profile
          </Link>
        ) : null}
      </div>
      <Form method="get" className="card grid gap-3 sm:grid-cols-[2fr_1fr_1fr_1fr_auto] sm:items-end" role="search">
        <div>
          <label className="label" htmlFor="q">
            Search
          </label>
          <input
            id="q"
            name="q"
            type="search"
            className="field"
            defaultValue={filters.q}
            placeholder="e.g. slipper, Dendrobium"
          />
        </div>
        <div>
          <label className="label" htmlFor="category">
            Temperature
          </label>
          <select id="category" name="category" className="field" defaultValue={filters.category}>
            <option value="">Any</option>
            {CATEGORIES.map((c) => (
              <option key={c} value={c}>
                {c} growing
              </option>
            ))}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="light">
            Light
          </label>
          <select id="light" name="light" className="field" defaultValue={filters.light}>
            <option value="">Any</option>
            {LIGHTS.map((l) => (
              <option key={l} value={l}>
                {l}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="source">
            Profiles
          </label>
          <select id="source" name="source" className="field" defaultValue={filters.source}>
            <option value="">All</option>
            <option value="library">Library</option>
            <option value="own">This site's own</option>
          </select>
        </div>
        <button className="btn-quiet">Show</button>
      </Form>
      <p className="text-sm text-muted" aria-live="polite">
        {plants.length === total ? `${total} profiles` : `${plants.length} of ${total} profiles`}
      </p>
      {plants.length === 0 ? (
        <p className="card text-muted">
          No profile matches. Try fewer filters{role === "owner" ? ", or add your own profile" : ""}.
        </p>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2" data-testid="plant-list">
          {plants.map((p) => (
            <li key={p.key} className="card space-y-1.5">
              <div className="flex flex-wrap items-baseline gap-x-2">
                <Link to={p.key} className="link font-semibold">
                  {p.name}
                </Link>
                {p.own ? <span className="tag">own profile</span> : null}
                {p.wanted ? <span className="text-xs text-muted">on the wishlist</span> : null}
              </div>
              <p className="text-sm">{p.summary}</p>
              <p className="text-sm text-muted">
                {p.category ? `${p.category} growing · ` : ""}nights {formatTemp(p.minNightC, unit, 0)} or more · days
                up to {formatTemp(p.maxDayC, unit, 0)} · {LIGHT_WORDS[p.light]}
              </p>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
