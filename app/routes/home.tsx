import { Link } from "react-router";
import { requireUser } from "~/.server/auth";
import { mySites } from "~/.server/sites";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [{ title: "My sites · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { sites: await mySites(user.id) };
}

const roleWords = { owner: "You look after this site", carer: "You help care here", mentor: "You advise here" };

export default function Home({ loaderData }: Route.ComponentProps) {
  const { sites } = loaderData;
  return (
    <main className="mx-auto max-w-6xl px-4 py-8 sm:px-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 className="h1">My sites</h1>
          <p className="mt-1 text-muted">A site is a home or garden; its spots are the places you are measuring.</p>
        </div>
        <Link to="/sites/new" className="btn">
          New site
        </Link>
      </div>
      {sites.length === 0 ? (
        <div className="card mt-8 max-w-xl">
          <h2 className="h2">Start by measuring</h2>
          <p className="mt-2 text-muted">
            Create a site for your home, add the spots you are thinking of (a windowsill, a shelf, a bench outside), and
            put a temperature and humidity sensor in each. After a few weeks Nichewise shows each spot's real range and
            which plants would thrive there.
          </p>
        </div>
      ) : (
        <ul className="mt-8 grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {sites.map((s) => (
            <li key={s.id}>
              <Link to={`/sites/${s.id}`} className="card block hover:border-accent/50">
                <p className="text-lg font-semibold">{s.name}</p>
                <p className="mt-1 text-sm text-muted">
                  {s.spotCount} {s.spotCount === 1 ? "spot" : "spots"} · {s.timeZone}
                </p>
                <p className="mt-3 text-sm">{roleWords[s.role]}</p>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </main>
  );
}
